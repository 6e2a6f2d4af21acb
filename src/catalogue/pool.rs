//! A pool of strings stored end to end in one buffer: one allocation for a
//! million ids instead of a million.

#[derive(Debug, Default, Clone)]
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

    pub fn byte_len(&self) -> usize {
        self.buf.len()
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
}
