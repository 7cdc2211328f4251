//! One sort for the engine and the app.
//!
//! The standard library's sorts are generic over the comparison, so every call with its own
//! closure compiles its own copy of the whole algorithm (about 600 bytes to 3 KB of WebAssembly
//! each; eighteen call sites had grown to 51 KB of the phone app's module). [`sort_by`] keeps
//! the generic part small: short lists (what most calls sort) go through an insertion sort, and
//! longer ones sort a list of positions through the one non-generic [`sort_positions`], then
//! move the elements into that order. [`map_of`] builds a map without `collect`'s sort.

use std::cmp::Ordering;
use std::collections::BTreeMap;

/// Lists up to this long are insertion sorted: at most 120 comparisons, and no allocation.
const SHORT: usize = 16;

/// Sorts `v` by `cmp`, stably (equal elements keep their order), in O(n log n) comparisons.
pub fn sort_by<T>(v: &mut [T], mut cmp: impl FnMut(&T, &T) -> Ordering) {
    if v.len() <= SHORT {
        // Each element sinks left past the larger ones before it; an equal one stops it, which
        // keeps the sort stable.
        for i in 1..v.len() {
            let mut j = i;
            while j > 0 && cmp(&v[j - 1], &v[j]) == Ordering::Greater {
                v.swap(j - 1, j);
                j -= 1;
            }
        }
        return;
    }
    let mut from: Vec<usize> = (0..v.len()).collect();
    sort_positions(&mut from, &mut |a, b| cmp(&v[a], &v[b]));
    permute(v, &mut from);
}

/// Sorts `v` by the key `key` gives each element, stably.
pub fn sort_by_key<T, K: Ord>(v: &mut [T], mut key: impl FnMut(&T) -> K) {
    sort_by(v, |a, b| key(a).cmp(&key(b)));
}

/// A map from key and value pairs, by inserting them one by one (a later pair with the same key
/// replaces an earlier one, as with `collect`). `collect` into a map sorts the pairs first with
/// the standard library's sort, a copy of it for every map type.
pub fn map_of<K: Ord, V>(pairs: impl IntoIterator<Item = (K, V)>) -> BTreeMap<K, V> {
    let mut map = BTreeMap::new();
    for (k, v) in pairs {
        map.insert(k, v);
    }
    map
}

/// Sorts positions by a comparison of the elements they stand for. Not generic, so the standard
/// library's stable sort is compiled once for the whole program.
fn sort_positions(positions: &mut [usize], cmp: &mut dyn FnMut(usize, usize) -> Ordering) {
    positions.sort_by(|&a, &b| cmp(a, b));
}

/// Reorders `v` so that its element `i` becomes the old element `from[i]`, in place, by following
/// each cycle of the permutation once; `from` is used up (every entry ends as its own position).
fn permute<T>(v: &mut [T], from: &mut [usize]) {
    for start in 0..v.len() {
        let mut at = start;
        // Along a cycle, the element first at `start` is carried forward by each swap, and the
        // last position of the cycle is the one whose source is `start`.
        while from[at] != start && from[at] != at {
            let next = from[at];
            v.swap(at, next);
            from[at] = at;
            at = next;
        }
        from[at] = at;
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Against the standard library's stable sort (a second, independent implementation), on
    /// lists on both sides of the insertion-sort cutoff, with many equal keys so that stability
    /// shows.
    #[test]
    fn matches_the_standard_stable_sort() {
        let mut seed = 12345u64;
        for n in [0, 1, 2, 3, 15, 16, 17, 40, 257] {
            let mut v: Vec<(u64, usize)> = (0..n)
                .map(|i| {
                    seed = seed
                        .wrapping_mul(6364136223846793005)
                        .wrapping_add(1442695040888963407);
                    ((seed >> 33) % 7, i)
                })
                .collect();
            let mut expected = v.clone();
            expected.sort_by_key(|a| a.0);
            sort_by(&mut v, |a, b| a.0.cmp(&b.0));
            assert_eq!(v, expected, "n = {n}");
        }
    }

    #[test]
    fn by_key_descending_and_already_sorted() {
        let mut v: Vec<i32> = (0..50).collect();
        sort_by_key(&mut v, |x| std::cmp::Reverse(*x));
        assert_eq!(v, (0..50).rev().collect::<Vec<_>>());
        sort_by_key(&mut v, |x| *x);
        assert_eq!(v, (0..50).collect::<Vec<_>>());
    }
}
