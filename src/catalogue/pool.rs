//! A pool of strings stored end to end in one buffer: one allocation for a
//! million ids instead of a million.

#[derive(Debug, Default, Clone, PartialEq, Eq)]
pub struct StrPool {
    buf: String,
    ends: Vec<usize>,
}

impl StrPool {
    pub fn with_capacity(strings: usize, bytes: usize) -> StrPool {
        StrPool {
            buf: String::with_capacity(bytes),
            ends: Vec::with_capacity(strings),
        }
    }

    /// Empties the pool, keeping its memory.
    pub fn clear(&mut self) {
        self.buf.clear();
        self.ends.clear();
    }

    pub fn push(&mut self, s: &str) -> usize {
        self.buf.push_str(s);
        self.ends.push(self.buf.len());
        self.ends.len() - 1
    }

    pub fn get(&self, i: usize) -> &str {
        let start = if i == 0 { 0 } else { self.ends[i - 1] };
        &self.buf[start..self.ends[i]]
    }

    /// Asks the memory for string `i` ahead of reading it: where it ends
    /// (`bytes` false), or, once that is at hand, its bytes (`bytes` true).
    /// A hint that never changes what the program computes.
    #[inline]
    pub fn prefetch(&self, i: usize, bytes: bool) {
        if bytes {
            let start = if i == 0 {
                0
            } else {
                self.ends.get(i - 1).copied().unwrap_or(0)
            };
            crate::prefetch::value(self.buf.as_bytes(), start);
        } else {
            crate::prefetch::value(&self.ends, i.saturating_sub(1));
            crate::prefetch::value(&self.ends, i);
        }
    }

    /// Appends every string of `other`.
    pub fn append(&mut self, other: &StrPool) {
        let base = self.buf.len();
        self.buf.push_str(&other.buf);
        self.ends.extend(other.ends.iter().map(|e| e + base));
    }

    /// The strings whose `keep` entry is true.
    pub fn filter(&self, keep: &[bool]) -> StrPool {
        let mut out = StrPool::with_capacity(self.len(), self.buf.len());
        for (i, &k) in keep.iter().enumerate().take(self.len()) {
            if k {
                out.push(self.get(i));
            }
        }
        out
    }

    /// Every string containing `needle`, in order, with the byte position
    /// of its first occurrence: one SIMD substring search (memchr's
    /// `memmem`) over the whole pool, not one per string. `hay` is the
    /// pool's bytes or a copy of the same length (e.g. ASCII lower case,
    /// which keeps every position).
    pub fn containing(&self, hay: &[u8], needle: &[u8], mut found: impl FnMut(usize, usize)) {
        assert_eq!(hay.len(), self.buf.len(), "a copy of the pool's bytes");
        if needle.is_empty() {
            return;
        }
        let finder = memchr::memmem::Finder::new(needle);
        let (ends, mut from, mut i) = (&self.ends, 0, 0);
        while i < ends.len() {
            // From the start of string i: a prefix (the common case when
            // many ids share a head) costs one compare, else search on.
            let p = if hay[from..ends[i]].starts_with(needle) {
                from
            } else {
                match finder.find(&hay[from..]) {
                    Some(p) => from + p,
                    None => break,
                }
            };
            // The string holding position p: close by when matches are
            // dense, else by bisection.
            let mut steps = 0;
            while ends[i] <= p && steps < 8 {
                i += 1;
                steps += 1;
            }
            if ends[i] <= p {
                i += ends[i..].partition_point(|&e| e <= p);
            }
            let start = if i == 0 { 0 } else { ends[i - 1] };
            if p + needle.len() <= ends[i] {
                found(i, p - start);
            }
            // A later match starting in string i is no earlier (or also
            // crosses its end): go on with the next string.
            from = ends[i];
            i += 1;
        }
    }

    /// Every string, in order.
    pub fn all(&self) -> Vec<&str> {
        let starts = std::iter::once(0).chain(self.ends.iter().copied());
        starts
            .zip(&self.ends)
            .map(|(a, &b)| &self.buf[a..b])
            .collect()
    }

    /// The pool's bytes, all strings end to end.
    pub fn bytes(&self) -> &[u8] {
        self.buf.as_bytes()
    }

    /// A digest of the strings in order ([`crate::fingerprint::digest_bytes`]
    /// of the bytes, then each end): pools of other strings, or of the same
    /// bytes cut elsewhere (`ab`, `c` and `a`, `bc`), differ.
    pub fn digest(&self) -> u64 {
        let h = crate::fingerprint::digest_bytes(crate::fingerprint::FNV_OFFSET, self.bytes());
        self.ends
            .iter()
            .fold(h, |h, &e| crate::fingerprint::mix(h, e as u64))
    }

    pub fn byte_len(&self) -> usize {
        self.buf.len()
    }

    pub fn is_empty(&self) -> bool {
        self.ends.is_empty()
    }

    pub fn len(&self) -> usize {
        self.ends.len()
    }

    pub fn shrink_to_fit(&mut self) {
        self.buf.shrink_to_fit();
        self.ends.shrink_to_fit();
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn push_get() {
        let mut p = StrPool::default();
        assert_eq!(p.push("ab"), 0);
        assert_eq!(p.push(""), 1);
        assert_eq!(p.push("çd"), 2);
        assert_eq!((p.get(0), p.get(1), p.get(2)), ("ab", "", "çd"));
        assert_eq!(p.len(), 3);
    }

    #[test]
    fn a_digest_knows_where_each_string_ends() {
        let pool = |ids: &[&str]| {
            let mut p = StrPool::default();
            for s in ids {
                p.push(s);
            }
            p
        };
        let d = pool(&["ab", "c"]).digest();
        assert_eq!(d, pool(&["ab", "c"]).digest());
        assert_ne!(d, pool(&["a", "bc"]).digest());
        assert_ne!(d, pool(&["ab", "c", ""]).digest());
        assert_ne!(d, pool(&["c", "ab"]).digest());
    }

    #[test]
    fn containing_finds_what_a_search_per_string_finds() {
        let mut p = StrPool::default();
        let words = ["abcab", "", "b", "xab", "a", "bab", "abab", "ba", "", "aab"];
        for w in words {
            p.push(w);
        }
        for needle in [
            "ab", "b", "a", "ba", "aba", "abcab", "zz", "bb", "ab", /* across ends */
        ] {
            let mut got = Vec::new();
            p.containing(p.bytes(), needle.as_bytes(), |i, at| got.push((i, at)));
            let want: Vec<_> = words
                .iter()
                .enumerate()
                .filter_map(|(i, w)| w.find(needle).map(|at| (i, at)))
                .collect();
            assert_eq!(got, want, "{needle}");
        }
        // Many strings between two matches (the bisection).
        let mut q = StrPool::default();
        for i in 0..1000 {
            q.push(if i % 97 == 3 { "xyz" } else { "ab" });
        }
        let mut got = Vec::new();
        q.containing(q.bytes(), b"yz", |i, at| got.push((i, at)));
        assert_eq!(
            got,
            (0..1000)
                .filter(|i| i % 97 == 3)
                .map(|i| (i, 1))
                .collect::<Vec<_>>()
        );
    }
}
