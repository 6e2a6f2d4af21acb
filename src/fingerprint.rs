//! The catalogue's fingerprint that a ledger records: FNV-1a, 64 bit
//! (Fowler, Noll & Vo), of the file's bytes.

/// FNV-1a, 64 bit (Fowler, Noll & Vo): a stable fingerprint of catalogue bytes.
pub fn fingerprint(bytes: &[u8]) -> String {
    fingerprint_text(fnv1a(FNV_OFFSET, bytes))
}

/// [`fingerprint`] of a file, read a block at a time (a catalogue of
/// gigabytes is never held for it).
pub fn fingerprint_file(path: &std::path::Path) -> std::io::Result<String> {
    use std::io::Read;
    let mut f = std::fs::File::open(path)?;
    let (mut h, mut block) = (FNV_OFFSET, vec![0u8; 1 << 20]);
    loop {
        match f.read(&mut block) {
            Ok(0) => return Ok(fingerprint_text(h)),
            Ok(n) => h = fnv1a(h, &block[..n]),
            Err(e) if e.kind() == std::io::ErrorKind::Interrupted => {}
            Err(e) => return Err(e),
        }
    }
}

/// The FNV-1a 64-bit offset basis (Fowler, Noll & Vo; IETF draft
/// "The FNV Non-Cryptographic Hash Algorithm", from memory).
pub const FNV_OFFSET: u64 = 0xcbf2_9ce4_8422_2325;

/// FNV-1a over `bytes`, continuing from `h` (so a file read in pieces
/// hashes as a whole).
pub fn fnv1a(mut h: u64, bytes: &[u8]) -> u64 {
    for &b in bytes {
        h ^= b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// A fingerprint as the ledger records it.
pub fn fingerprint_text(h: u64) -> String {
    format!("fnv1a64:{h:016x}")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reference_values_and_files() {
        // FNV-1a 64 of "a" is 0xaf63dc4c8601ec8c (Fowler–Noll–Vo reference vectors, from memory).
        assert_eq!(fingerprint(b"a"), "fnv1a64:af63dc4c8601ec8c");
        // A file read a block at a time hashes as its bytes do whole.
        let bytes: Vec<u8> = (0..3_000_000u32).map(|i| (i * 7 % 251) as u8).collect();
        let path = std::env::temp_dir().join(format!("starsift-fp-{}", std::process::id()));
        std::fs::write(&path, &bytes).unwrap();
        assert_eq!(fingerprint_file(&path).unwrap(), fingerprint(&bytes));
        let _ = std::fs::remove_file(&path);
    }
}
