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
}
