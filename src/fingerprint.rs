//! The catalogue's fingerprint that a ledger records: XXH64 (Collet's
//! xxHash, 64 bit, seed 0) of the file's bytes, eight bytes a step in four
//! lanes; FNV-1a, 64 bit (Fowler, Noll & Vo), one byte a step, for the
//! fingerprints earlier versions recorded; and the file's stamp (size,
//! times, inode), by which a ledger that has seen a file knows its
//! fingerprint again without reading it.

/// The fingerprint of catalogue bytes, as the ledger records it (XXH64).
pub fn fingerprint(bytes: &[u8]) -> String {
    let mut h = Xxh64::new();
    h.update(bytes);
    fingerprint_text(h.value())
}

/// [`fingerprint`] of a file, read a block at a time (a catalogue of
/// gigabytes is never held for it).
pub fn fingerprint_file(path: &std::path::Path) -> std::io::Result<String> {
    let mut h = Xxh64::new();
    each_block(path, |b| h.update(b))?;
    Ok(fingerprint_text(h.value()))
}

/// The FNV-1a fingerprint earlier versions recorded of a file (and named a
/// ledger in the data folder by): to know a file again by a sighting an
/// earlier version recorded.
pub fn earlier_fingerprint_file(path: &std::path::Path) -> std::io::Result<String> {
    let mut h = FNV_OFFSET;
    each_block(path, |b| h = fnv1a(h, b))?;
    Ok(earlier_fingerprint_text(h))
}

/// [`earlier_fingerprint_file`] of bytes held in memory.
pub fn earlier_fingerprint(bytes: &[u8]) -> String {
    earlier_fingerprint_text(fnv1a(FNV_OFFSET, bytes))
}

/// Whether a recorded fingerprint is of the kind earlier versions
/// recorded ([`earlier_fingerprint`]).
pub fn is_earlier(fp: &str) -> bool {
    fp.starts_with(EARLIER_PREFIX)
}

const EARLIER_PREFIX: &str = "fnv1a64:";

fn earlier_fingerprint_text(h: u64) -> String {
    format!("{EARLIER_PREFIX}{h:016x}")
}

/// `each` of every block of the file, in order.
fn each_block(path: &std::path::Path, mut each: impl FnMut(&[u8])) -> std::io::Result<()> {
    use std::io::Read;
    let mut f = std::fs::File::open(path)?;
    let mut block = vec![0u8; 1 << 20];
    loop {
        match f.read(&mut block) {
            Ok(0) => return Ok(()),
            Ok(n) => each(&block[..n]),
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

/// XXH64 (Y. Collet, xxHash, "XXH64 algorithm description", seed 0; the
/// primes and steps from memory, the results checked against the xxhash
/// reference library), over bytes given in pieces: the same value however
/// they are cut. Four lanes of eight bytes, each a multiply a step, so it
/// runs at memory speed where FNV-1a waits on one multiply a byte.
#[derive(Clone)]
pub struct Xxh64 {
    lanes: [u64; 4],
    /// Bytes of the next 32-byte stripe held until it is whole.
    held: [u8; 32],
    held_len: usize,
    total: u64,
}

const P1: u64 = 0x9E37_79B1_85EB_CA87;
const P2: u64 = 0xC2B2_AE3D_27D4_EB4F;
const P3: u64 = 0x1656_67B1_9E37_79F9;
const P4: u64 = 0x85EB_CA77_C2B2_AE63;
const P5: u64 = 0x27D4_EB2F_1656_67C5;

fn xxh_round(acc: u64, input: u64) -> u64 {
    acc.wrapping_add(input.wrapping_mul(P2))
        .rotate_left(31)
        .wrapping_mul(P1)
}

fn xxh_merge(acc: u64, lane: u64) -> u64 {
    (acc ^ xxh_round(0, lane)).wrapping_mul(P1).wrapping_add(P4)
}

fn word(b: &[u8]) -> u64 {
    u64::from_le_bytes(b[..8].try_into().unwrap_or([0; 8]))
}

impl Default for Xxh64 {
    fn default() -> Self {
        Xxh64::new()
    }
}

impl Xxh64 {
    pub fn new() -> Xxh64 {
        Xxh64 {
            lanes: [P1.wrapping_add(P2), P2, 0, 0u64.wrapping_sub(P1)],
            held: [0; 32],
            held_len: 0,
            total: 0,
        }
    }

    fn stripe(&mut self, s: &[u8]) {
        for (k, lane) in self.lanes.iter_mut().enumerate() {
            *lane = xxh_round(*lane, word(&s[8 * k..]));
        }
    }

    pub fn update(&mut self, mut bytes: &[u8]) {
        self.total += bytes.len() as u64;
        if self.held_len > 0 {
            let take = (32 - self.held_len).min(bytes.len());
            self.held[self.held_len..self.held_len + take].copy_from_slice(&bytes[..take]);
            self.held_len += take;
            bytes = &bytes[take..];
            if self.held_len < 32 {
                return;
            }
            let held = self.held;
            self.stripe(&held);
            self.held_len = 0;
        }
        let mut stripes = bytes.chunks_exact(32);
        for s in &mut stripes {
            self.stripe(s);
        }
        let rest = stripes.remainder();
        self.held[..rest.len()].copy_from_slice(rest);
        self.held_len = rest.len();
    }

    /// The hash of the bytes given so far (more may follow).
    pub fn value(&self) -> u64 {
        let [v1, v2, v3, v4] = self.lanes;
        let mut h = if self.total >= 32 {
            let h = v1
                .rotate_left(1)
                .wrapping_add(v2.rotate_left(7))
                .wrapping_add(v3.rotate_left(12))
                .wrapping_add(v4.rotate_left(18));
            [v1, v2, v3, v4].into_iter().fold(h, xxh_merge)
        } else {
            P5
        };
        h = h.wrapping_add(self.total);
        let mut rest = &self.held[..self.held_len];
        while rest.len() >= 8 {
            h = (h ^ xxh_round(0, word(rest)))
                .rotate_left(27)
                .wrapping_mul(P1)
                .wrapping_add(P4);
            rest = &rest[8..];
        }
        if rest.len() >= 4 {
            let w = u32::from_le_bytes(rest[..4].try_into().unwrap_or([0; 4]));
            h = (h ^ u64::from(w).wrapping_mul(P1))
                .rotate_left(23)
                .wrapping_mul(P2)
                .wrapping_add(P3);
            rest = &rest[4..];
        }
        for &b in rest {
            h = (h ^ u64::from(b).wrapping_mul(P5))
                .rotate_left(11)
                .wrapping_mul(P1);
        }
        h ^= h >> 33;
        h = h.wrapping_mul(P2);
        h ^= h >> 29;
        h = h.wrapping_mul(P3);
        h ^ (h >> 32)
    }
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

/// A fingerprint as the ledger records it ([`Xxh64`]'s value).
pub fn fingerprint_text(h: u64) -> String {
    format!("xxh64:{h:016x}")
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
        assert_eq!(earlier_fingerprint(b"a"), "fnv1a64:af63dc4c8601ec8c");
        // XXH64, seed 0: the values of the xxhash reference library
        // (Python `xxhash` 3.x, `xxh64(bytes).hexdigest()`, run offline).
        let bytes: Vec<u8> = (0..3_000_000u32).map(|i| (i * 7 % 251) as u8).collect();
        for (b, want) in [
            (&b""[..], "ef46db3751d8e999"),
            (b"a", "d24ec4f1a98c6e5b"),
            (b"abc", "44bc2cf5ad770999"),
            (b"123456789", "8cb841db40e6ae83"),
            (&bytes[..100], "b7fe1d84b2f23a05"),
            (&bytes, "0b9c59816c9e9848"),
        ] {
            assert_eq!(fingerprint(b), format!("xxh64:{want}"), "{} bytes", b.len());
        }
        // Given in pieces of any size, the same value.
        for cut in [1, 3, 31, 32, 33, 1000] {
            let mut h = Xxh64::new();
            for piece in bytes[..5000].chunks(cut) {
                h.update(piece);
            }
            let mut whole = Xxh64::new();
            whole.update(&bytes[..5000]);
            assert_eq!(h.value(), whole.value(), "pieces of {cut}");
        }
        // A file read a block at a time hashes as its bytes do whole.
        let path = std::env::temp_dir().join(format!("starsift-fp-{}", std::process::id()));
        std::fs::write(&path, &bytes).unwrap();
        assert_eq!(fingerprint_file(&path).unwrap(), fingerprint(&bytes));
        assert_eq!(
            earlier_fingerprint_file(&path).unwrap(),
            earlier_fingerprint(&bytes)
        );
        assert!(is_earlier(&earlier_fingerprint(&bytes)) && !is_earlier(&fingerprint(&bytes)));
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
