//! A Fenwick tree of counts (the verdict counts of `live`, by prior class).

/// A Fenwick tree of counts over prior classes (Fenwick 1994, Software:
/// Practice and Experience 24, 327): add and prefix sum in O(log n).
#[derive(Clone, Debug, PartialEq)]
pub(super) struct Fenwick {
    tree: Vec<u32>,
    /// The sum of every count.
    pub total: usize,
}

impl Fenwick {
    pub fn new(n: usize) -> Fenwick {
        Fenwick {
            tree: vec![0; n + 1],
            total: 0,
        }
    }

    pub fn add(&mut self, i: usize, delta: i32) {
        self.total = self.total.wrapping_add_signed(delta as isize);
        let mut i = i + 1;
        while i < self.tree.len() {
            self.tree[i] = self.tree[i].wrapping_add_signed(delta);
            i += i & i.wrapping_neg();
        }
    }

    /// Sum over classes 0..i.
    pub fn prefix(&self, i: usize) -> usize {
        let (mut i, mut s) = (i, 0u32);
        while i > 0 {
            s = s.wrapping_add(self.tree[i]);
            i &= i - 1;
        }
        s as usize
    }
}
