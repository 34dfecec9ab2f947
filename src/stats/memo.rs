//! A small per-thread memo for work that depends only on a column's length
//! (and fixed settings), not on its values: the Maritz-Jarrett weights,
//! the exact median's probabilities and the direct medians' drawn ranks.
//! The columns of one group usually have the same length and are evaluated
//! one after another on the same thread, so the work is done once per
//! group instead of once per column, and results are the same bit for bit.

use std::rc::Rc;

/// The last few (key, value) pairs computed, most recent first.
pub(crate) struct Memo<K, V> {
    entries: Vec<(K, Rc<V>)>,
    capacity: usize,
}

impl<K: PartialEq, V> Memo<K, V> {
    /// An empty memo keeping at most `capacity` values.
    pub(crate) const fn new(capacity: usize) -> Memo<K, V> {
        Memo {
            entries: Vec::new(),
            capacity,
        }
    }

    /// The value for `key`: remembered, or made by `make` and remembered
    /// in place of the least recently used one.
    pub(crate) fn get_or_make(&mut self, key: K, make: impl FnOnce() -> V) -> Rc<V> {
        if let Some(i) = self.entries.iter().position(|(k, _)| *k == key) {
            let entry = self.entries.remove(i);
            let value = Rc::clone(&entry.1);
            self.entries.insert(0, entry);
            return value;
        }
        let value = Rc::new(make());
        self.entries.truncate(self.capacity.saturating_sub(1));
        self.entries.insert(0, (key, Rc::clone(&value)));
        value
    }
}

/// `get_or_make` on a thread's own memo declared with `thread_local!`.
macro_rules! remembered {
    ($memo:ident, $key:expr, $make:expr) => {
        $memo.with(|memo| memo.borrow_mut().get_or_make($key, $make))
    };
}
pub(crate) use remembered;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_value_is_made_once_and_the_oldest_is_forgotten() {
        let mut memo = Memo::new(2);
        let mut made = 0;
        let mut get = |memo: &mut Memo<u32, u32>, key: u32| {
            *memo.get_or_make(key, || {
                made += 1;
                key * 10
            })
        };
        assert_eq!(get(&mut memo, 1), 10);
        assert_eq!(get(&mut memo, 1), 10);
        assert_eq!(get(&mut memo, 2), 20);
        assert_eq!(get(&mut memo, 1), 10); // 1 is now the most recent
        assert_eq!(get(&mut memo, 3), 30); // forgets 2
        assert_eq!(get(&mut memo, 1), 10);
        assert_eq!(get(&mut memo, 2), 20);
        assert_eq!(made, 4);
    }
}
