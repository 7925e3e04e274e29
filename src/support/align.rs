//! The one edit-distance alignment of two sequences (V. I. Levenshtein, "Binary codes capable of
//! correcting deletions, insertions and reversals", 1966; R. A. Wagner & M. J. Fischer, "The
//! string-to-string correction problem", JACM 1974), shared by evaluation (unit costs), the
//! review screen's comparison (stress-aware costs) and the variants' feature view (feature
//! distance costs).
//!
//! The caller describes the two sequences only by their lengths and a substitution cost for
//! each pair of positions, plus one cost for an insertion or a deletion; this module finds a
//! cheapest alignment and its cost. Ties are broken the same way everywhere, walking back from
//! the end: a substitution (or match) first, then a step that uses up an element of the left
//! sequence alone, then one of the right sequence alone. So alignments are reproducible and
//! each caller's output stays what it was. It owns no notion of phones or stress.

use std::ops::Add;

/// A cost that can be added and compared: `usize` (compared exactly) or `f64` (two costs within
/// 1e-9 count as equal while walking back, so rounding never breaks a path).
pub trait Cost: Copy + PartialOrd + Add<Output = Self> {
    /// The cost of nothing.
    const ZERO: Self;
    /// Whether two costs count as equal.
    fn same(self, other: Self) -> bool;
}

impl Cost for usize {
    const ZERO: usize = 0;
    fn same(self, other: usize) -> bool {
        self == other
    }
}

impl Cost for f64 {
    const ZERO: f64 = 0.0;
    fn same(self, other: f64) -> bool {
        (self - other).abs() < 1e-9
    }
}

fn cheaper<C: Cost>(a: C, b: C) -> C {
    if b < a {
        b
    } else {
        a
    }
}

/// One aligned position: the index of the left element, of the right element, or both (a match
/// or substitution). `(Some(i), None)` uses left element `i` alone (deleted from the right's
/// point of view); `(None, Some(j))` uses right element `j` alone.
pub type Pair = (Option<usize>, Option<usize>);

/// A cheapest alignment: the aligned positions in order and their total cost.
#[derive(Debug, Clone, PartialEq)]
pub struct Alignment<C> {
    /// Aligned positions, first to last; every index of both sides appears once, in order.
    pub pairs: Vec<Pair>,
    /// Sum of the costs of the pairs.
    pub cost: C,
}

/// Aligns a left sequence of `left` elements with a right one of `right` elements, where
/// `substitute(i, j)` is the cost of pairing left `i` with right `j` (zero for a match) and
/// `indel` the cost of an element on one side alone.
///
/// ```
/// use orthoepy::support::align::align;
/// let (a, b) = (["HH", "AA1", "R"], ["AA1", "R"]);
/// let found = align(a.len(), b.len(), 1usize, |i, j| usize::from(a[i] != b[j]));
/// assert_eq!(found.cost, 1);
/// assert_eq!(found.pairs, vec![(Some(0), None), (Some(1), Some(0)), (Some(2), Some(1))]);
/// ```
pub fn align<C: Cost>(left: usize, right: usize, indel: C, substitute: impl Fn(usize, usize) -> C) -> Alignment<C> {
    let width = right + 1;
    let mut table = vec![C::ZERO; (left + 1) * width];
    for j in 1..=right {
        table[j] = table[j - 1] + indel;
    }
    for i in 1..=left {
        table[i * width] = table[(i - 1) * width] + indel;
        for j in 1..=right {
            let diagonal = table[(i - 1) * width + j - 1] + substitute(i - 1, j - 1);
            let up = table[(i - 1) * width + j] + indel;
            let side = table[i * width + j - 1] + indel;
            table[i * width + j] = cheaper(cheaper(diagonal, up), side);
        }
    }
    let mut pairs = Vec::with_capacity(left.max(right));
    let (mut i, mut j) = (left, right);
    while i > 0 || j > 0 {
        let here = table[i * width + j];
        if i > 0 && j > 0 && (table[(i - 1) * width + j - 1] + substitute(i - 1, j - 1)).same(here) {
            pairs.push((Some(i - 1), Some(j - 1)));
            i -= 1;
            j -= 1;
        } else if i > 0 && (j == 0 || (table[(i - 1) * width + j] + indel).same(here)) {
            pairs.push((Some(i - 1), None));
            i -= 1;
        } else {
            pairs.push((None, Some(j - 1)));
            j -= 1;
        }
    }
    pairs.reverse();
    Alignment { pairs, cost: table[left * width + right] }
}

/// The cost of a cheapest alignment, without the alignment (two rows of the table, so long
/// sequences cost little memory). Always equals `align(..).cost`.
///
/// ```
/// use orthoepy::support::align::distance;
/// let (a, b) = (b"kitten", b"sitting");
/// assert_eq!(distance(a.len(), b.len(), 1usize, |i, j| usize::from(a[i] != b[j])), 3);
/// ```
pub fn distance<C: Cost>(left: usize, right: usize, indel: C, substitute: impl Fn(usize, usize) -> C) -> C {
    let mut previous: Vec<C> = Vec::with_capacity(right + 1);
    previous.push(C::ZERO);
    for j in 1..=right {
        let last = previous[j - 1];
        previous.push(last + indel);
    }
    let mut row = previous.clone();
    for i in 1..=left {
        row[0] = previous[0] + indel;
        for j in 1..=right {
            let diagonal = previous[j - 1] + substitute(i - 1, j - 1);
            row[j] = cheaper(cheaper(diagonal, previous[j] + indel), row[j - 1] + indel);
        }
        std::mem::swap(&mut row, &mut previous);
    }
    previous[right]
}

/// Levenshtein distance (unit costs) between two sequences.
///
/// ```
/// use orthoepy::support::align::levenshtein;
/// // The textbook example: kitten → sitting takes 3 edits.
/// let (a, b): (Vec<char>, Vec<char>) = ("kitten".chars().collect(), "sitting".chars().collect());
/// assert_eq!(levenshtein(&a, &b), 3);
/// ```
pub fn levenshtein<T: PartialEq>(a: &[T], b: &[T]) -> usize {
    distance(a.len(), b.len(), 1usize, |i, j| usize::from(a[i] != b[j]))
}

/// The candidate closest to `sequence` by [`levenshtein`] distance: `(index, distance)`; ties go
/// to the first candidate. `None` if there are no candidates.
///
/// ```
/// use orthoepy::support::align::closest;
/// fn p(s: &str) -> Vec<&str> { s.split(' ').collect() }
/// let variants = [p("R AW1 T"), p("R UW1 T S"), p("R UW1 T")];
/// assert_eq!(closest(&p("R UW1 T"), &variants), Some((2, 0)));
/// assert_eq!(closest(&p("R UW1"), &variants[..2]), Some((0, 2)));
/// ```
pub fn closest<T: PartialEq, R: AsRef<[T]>>(sequence: &[T], candidates: &[R]) -> Option<(usize, usize)> {
    candidates.iter().enumerate().map(|(i, c)| (i, levenshtein(sequence, c.as_ref()))).min_by_key(|&(i, d)| (d, i))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn chars(s: &str) -> Vec<char> {
        s.chars().collect()
    }

    #[test]
    fn levenshtein_matches_textbook_distances() {
        // Distances found in the literature and easily checked by hand (common practice):
        // kitten/sitting 3, flaw/lawn 2, saturday/sunday 3, empty against n letters n.
        for (a, b, d) in [("kitten", "sitting", 3), ("flaw", "lawn", 2), ("saturday", "sunday", 3), ("", "abc", 3), ("abc", "", 3), ("", "", 0)] {
            assert_eq!(levenshtein(&chars(a), &chars(b)), d, "{a} / {b}");
        }
    }

    #[test]
    fn distance_equals_the_aligned_cost_and_pairs_cover_both_sides() {
        let words = ["", "a", "ab", "ba", "abc", "acb", "kitten", "sitting", "harbour", "arbour"];
        for a in words {
            for b in words {
                let (x, y) = (chars(a), chars(b));
                let sub = |i: usize, j: usize| usize::from(x[i] != y[j]);
                let found = align(x.len(), y.len(), 1usize, sub);
                assert_eq!(found.cost, distance(x.len(), y.len(), 1usize, sub), "{a} / {b}");
                let lefts: Vec<usize> = found.pairs.iter().filter_map(|p| p.0).collect();
                let rights: Vec<usize> = found.pairs.iter().filter_map(|p| p.1).collect();
                assert_eq!(lefts, (0..x.len()).collect::<Vec<_>>());
                assert_eq!(rights, (0..y.len()).collect::<Vec<_>>());
                let summed: usize = found
                    .pairs
                    .iter()
                    .map(|p| match *p {
                        (Some(i), Some(j)) => sub(i, j),
                        _ => 1,
                    })
                    .sum();
                assert_eq!(summed, found.cost);
            }
        }
    }

    #[test]
    fn float_costs_walk_back_through_rounding() {
        let (a, b) = ([0.1f64, 0.2, 0.3], [0.1f64, 0.3]);
        let found = align(a.len(), b.len(), 1.0f64, |i, j| (a[i] - b[j]).abs());
        assert_eq!(found.pairs, vec![(Some(0), Some(0)), (Some(1), None), (Some(2), Some(1))]);
        assert!((found.cost - 1.0).abs() < 1e-12);
    }
}
