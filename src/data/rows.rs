//! Data row numbers of one group, one byte a row.
//!
//! Row numbers within a group only grow, so each is stored as its step from the
//! previous one: a byte when the step is below 255 (the usual case, even with many
//! interleaved groups), else a 255 marker and the full number on a side list. A
//! 10M-row run keeps 10 MB of row numbers instead of 40 MB.

use super::column::Column;

const WIDE: u8 = u8::MAX;

/// Increasing row numbers, delta-coded.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RowNumbers {
    steps: Column<u8>,
    wide: Vec<u32>,
    last: u32,
}

impl RowNumbers {
    /// No rows yet.
    pub fn new() -> Self {
        RowNumbers::default()
    }

    /// Appends `row`, which must exceed the previous one.
    #[inline]
    pub fn push(&mut self, row: u32) {
        let step = row.wrapping_sub(self.last);
        if step < u32::from(WIDE) && row > self.last {
            self.steps.push(step as u8);
        } else {
            self.steps.push(WIDE);
            self.wide.push(row);
        }
        self.last = row;
    }

    /// Moves a later part's row numbers onto the end, each `shift` higher (its
    /// rows were numbered from its own start). Only the first step is re-coded.
    pub fn append(&mut self, mut later: RowNumbers, shift: u32) {
        let Some(first) = later.steps.first_mut() else {
            return;
        };
        // The first step counts from the later part's row 0; as an absolute row
        // in the wide list it needs no step from `self.last`.
        if *first != WIDE {
            later.wide.insert(0, u32::from(*first));
            *first = WIDE;
        }
        for row in &mut later.wide {
            *row += shift;
        }
        self.steps.append(later.steps);
        self.wide.append(&mut later.wide);
        self.last = later.last + shift;
    }

    /// Number of rows.
    pub fn len(&self) -> usize {
        self.steps.len()
    }

    /// True when there is no row.
    pub fn is_empty(&self) -> bool {
        self.steps.is_empty()
    }

    /// The row numbers in order.
    pub fn iter(&self) -> impl Iterator<Item = u32> + '_ {
        let mut wide = self.wide.iter();
        let mut row = 0u32;
        self.steps.iter().map(move |s| {
            row = if s == WIDE {
                *wide.next().unwrap_or(&row)
            } else {
                row + u32::from(s)
            };
            row
        })
    }

    /// The row numbers in a vector.
    pub fn to_vec(&self) -> Vec<u32> {
        self.iter().collect()
    }
}

impl FromIterator<u32> for RowNumbers {
    fn from_iter<I: IntoIterator<Item = u32>>(iter: I) -> Self {
        let mut r = RowNumbers::new();
        for v in iter {
            r.push(v);
        }
        r
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn round_trips_small_and_large_steps() {
        let rows = [
            1u32,
            2,
            3,
            300,
            301,
            555,
            100_000,
            100_254,
            100_255,
            4_000_000_000,
        ];
        let r: RowNumbers = rows.iter().copied().collect();
        assert_eq!(r.to_vec(), rows);
        assert_eq!(r.len(), rows.len());
        // Row 0 never occurs (rows are 1-based), but a first row of 255 is wide.
        let r: RowNumbers = [255u32, 509].into_iter().collect();
        assert_eq!(r.to_vec(), vec![255, 509]);
    }

    #[test]
    fn appended_parts_read_as_one() {
        let cases: [(&[u32], &[u32], u32); 4] = [
            (&[1, 2, 300], &[1, 5, 1000], 400),
            (&[], &[3, 4], 10),
            (&[7], &[], 10),
            (&[1, 2], &[300, 301], 2),
        ];
        for (a, b, shift) in cases {
            let mut r: RowNumbers = a.iter().copied().collect();
            r.append(b.iter().copied().collect(), shift);
            r.push(shift + 5000);
            let mut want: Vec<u32> = a.to_vec();
            want.extend(b.iter().map(|x| x + shift));
            want.push(shift + 5000);
            assert_eq!(r.to_vec(), want, "{a:?} then {b:?} + {shift}");
            assert_eq!(r.len(), want.len());
        }
    }
}
