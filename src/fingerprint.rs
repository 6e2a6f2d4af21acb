//! The catalogue's fingerprint that a ledger records: FNV-1a, 64 bit
//! (Fowler, Noll & Vo), of the file's bytes; and the file's stamp (size,
//! times, inode), by which a ledger that has seen a file knows its
//! fingerprint again without reading it.

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

/// One step of [`digest_bytes`]: the word folded into the state by an
/// exclusive or, a multiply by an odd constant (2^64 / φ, Knuth's
/// multiplicative hashing, TAOCP vol. 3 §6.4, from memory) and a shift
/// that brings the high bits down. For a given word each step is a
/// bijection of the state, so two inputs of one length that differ in a
/// single word never share a digest.
pub fn mix(h: u64, word: u64) -> u64 {
    let h = (h ^ word).wrapping_mul(0x9e37_79b9_7f4a_7c15);
    h ^ (h >> 29)
}

/// A quick digest of bytes held in memory, eight at a time (FNV-1a takes
/// them one at a time, ~8x slower): to know a set of ids again, never to
/// name a file (that is [`fingerprint`]).
pub fn digest_bytes(mut h: u64, bytes: &[u8]) -> u64 {
    let mut words = bytes.chunks_exact(8);
    for w in &mut words {
        h = mix(h, u64::from_le_bytes(w.try_into().unwrap_or([0; 8])));
    }
    let mut tail = [0u8; 8];
    tail[..words.remainder().len()].copy_from_slice(words.remainder());
    mix(mix(h, u64::from_le_bytes(tail)), bytes.len() as u64)
}

/// A fingerprint as the ledger records it.
pub fn fingerprint_text(h: u64) -> String {
    format!("fnv1a64:{h:016x}")
}

/// A file's stamp: what the file system says of it (size, modification
/// and change times in nanoseconds, device and inode), as text. The same
/// stamp means the same file, untouched, as build tools and file
/// synchronisers assume (common practice, no source): any write moves the
/// change time, which no program can set back. `None` when the stamp cannot
/// be trusted: a file touched so recently that a second write could still
/// land in the same tick of the file system's clock (within 2 s where the
/// times have whole seconds only, some file systems' granularity; within
/// 0.1 s where they have fractions, coarser than any clock tick of a local
/// file system, from memory), or a system without these facts.
pub fn file_stamp(path: &std::path::Path) -> Option<String> {
    let meta = std::fs::metadata(path).ok()?;
    stamp_at(&meta, std::time::SystemTime::now())
}

/// [`file_stamp`] of `meta` as seen at time `now`.
#[cfg(unix)]
pub fn stamp_at(meta: &std::fs::Metadata, now: std::time::SystemTime) -> Option<String> {
    use std::os::unix::fs::MetadataExt;
    if !meta.is_file() {
        return None;
    }
    let ns = |s: i64, n: i64| s.checked_mul(1_000_000_000)?.checked_add(n);
    let (modified, changed) = (
        ns(meta.mtime(), meta.mtime_nsec())?,
        ns(meta.ctime(), meta.ctime_nsec())?,
    );
    let now = now.duration_since(std::time::UNIX_EPOCH).ok()?;
    let now = i64::try_from(now.as_nanos()).ok()?;
    let fractions = meta.mtime_nsec() != 0 && meta.ctime_nsec() != 0;
    let settle = if fractions {
        100_000_000
    } else {
        2_000_000_000
    };
    if now - modified.max(changed) < settle {
        return None;
    }
    Some(format!(
        "size {} modified {modified} changed {changed} device {} inode {}",
        meta.len(),
        meta.dev(),
        meta.ino()
    ))
}

/// [`file_stamp`] of `meta` as seen at time `now`: never, where the file
/// system's change time and inode are not known.
#[cfg(not(unix))]
pub fn stamp_at(_meta: &std::fs::Metadata, _now: std::time::SystemTime) -> Option<String> {
    None
}

#[cfg(test)]
mod tests {
    use super::*;

    #[cfg(unix)]
    #[test]
    fn a_stamp_names_the_file_as_it_is_and_waits_for_it_to_settle() {
        use std::time::{Duration, SystemTime};
        let path = std::env::temp_dir().join(format!("starsift-stamp-{}", std::process::id()));
        std::fs::write(&path, b"0123456789").unwrap();
        let meta = std::fs::metadata(&path).unwrap();
        let later = SystemTime::now() + Duration::from_secs(3);
        // Just written: not yet to be trusted; seconds later, it is.
        assert_eq!(stamp_at(&meta, SystemTime::now()), None);
        let first = stamp_at(&meta, later).expect("a settled file has a stamp");
        assert!(first.starts_with("size 10 "), "{first}");
        // Rewritten with other bytes of the same length: another stamp,
        // because the change time moved.
        std::thread::sleep(Duration::from_millis(20));
        std::fs::write(&path, b"9876543210").unwrap();
        let again = stamp_at(&std::fs::metadata(&path).unwrap(), later).unwrap();
        assert_ne!(first, again);
        // Only what the file system says: reading changes nothing.
        let _ = std::fs::read(&path).unwrap();
        assert_eq!(
            stamp_at(&std::fs::metadata(&path).unwrap(), later).unwrap(),
            again
        );
        let _ = std::fs::remove_file(&path);
    }

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

    #[test]
    fn a_digest_tells_apart_bytes_that_differ_anywhere() {
        let base: Vec<u8> = (0..1003u32).map(|i| (i * 13 % 256) as u8).collect();
        let d = digest_bytes(FNV_OFFSET, &base);
        assert_eq!(d, digest_bytes(FNV_OFFSET, &base.clone()));
        // Every single byte changed, in the words and in the tail.
        for i in 0..base.len() {
            let mut other = base.clone();
            other[i] ^= 0x20;
            assert_ne!(digest_bytes(FNV_OFFSET, &other), d, "byte {i}");
        }
        // Zeros added at the end: the length is folded in.
        let mut longer = base.clone();
        longer.push(0);
        assert_ne!(digest_bytes(FNV_OFFSET, &longer), d);
        assert_ne!(
            digest_bytes(FNV_OFFSET, b""),
            digest_bytes(FNV_OFFSET, &[0])
        );
    }
}
