//! A growable column stored in fixed-size chunks.
//!
//! A `Vec` that doubles can hold up to twice the memory it needs while it grows;
//! with ten million rows that slack alone would break the memory target. Chunks of
//! fixed size cap the slack at one chunk per column.
//!
//! Chunks are full but for the last, except where [`Column::append`] joined two
//! columns: there the first one's last chunk stays short, so that joining moves
//! chunks instead of copying values.

const CHUNK: usize = 1 << 13;

/// Values in insertion order, in chunks of at most 8,192.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Column<T> {
    chunks: Vec<Vec<T>>,
    /// Index of each chunk's first value.
    starts: Vec<usize>,
    len: usize,
}

impl<T: Copy> Column<T> {
    /// An empty column.
    pub fn new() -> Self {
        Column {
            chunks: Vec::new(),
            starts: Vec::new(),
            len: 0,
        }
    }

    /// Appends a value.
    #[inline]
    pub fn push(&mut self, v: T) {
        match self.chunks.last_mut() {
            Some(last) if last.len() < CHUNK => last.push(v),
            _ => {
                let mut chunk = Vec::with_capacity(CHUNK);
                chunk.push(v);
                self.chunks.push(chunk);
                self.starts.push(self.len);
            }
        }
        self.len += 1;
    }

    /// Moves `later`'s values onto the end without copying them. Two columns
    /// pushed and appended together keep the same chunk boundaries.
    pub fn append(&mut self, later: Column<T>) {
        if let Some(last) = self.chunks.last_mut() {
            last.shrink_to_fit();
        }
        for (chunk, start) in later.chunks.into_iter().zip(later.starts) {
            self.chunks.push(chunk);
            self.starts.push(self.len + start);
        }
        self.len += later.len;
    }

    /// The first value, to change in place.
    pub fn first_mut(&mut self) -> Option<&mut T> {
        self.chunks.first_mut()?.first_mut()
    }

    /// Number of values.
    pub fn len(&self) -> usize {
        self.len
    }

    /// True when the column holds no value.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// The chunks in order, as slices (for loops the compiler can keep tight).
    pub fn chunks(&self) -> impl Iterator<Item = &[T]> + '_ {
        self.chunks.iter().map(Vec::as_slice)
    }

    /// The values in order.
    pub fn iter(&self) -> impl Iterator<Item = T> + '_ {
        self.chunks.iter().flat_map(|c| c.iter().copied())
    }

    /// The value at `i`.
    pub fn get(&self, i: usize) -> Option<T> {
        let chunk = self.starts.partition_point(|&s| s <= i).checked_sub(1)?;
        self.chunks[chunk].get(i - self.starts[chunk]).copied()
    }

    /// Copies the values into one contiguous vector.
    pub fn to_vec(&self) -> Vec<T> {
        let mut v = Vec::with_capacity(self.len);
        for c in &self.chunks {
            v.extend_from_slice(c);
        }
        v
    }
}

impl<T: Copy> FromIterator<T> for Column<T> {
    fn from_iter<I: IntoIterator<Item = T>>(iter: I) -> Self {
        let mut c = Column::new();
        for v in iter {
            c.push(v);
        }
        c
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn keeps_order_across_chunks() {
        let c: Column<u32> = (0..(CHUNK as u32 * 2 + 5)).collect();
        assert_eq!(c.len(), CHUNK * 2 + 5);
        assert_eq!(c.get(CHUNK + 3), Some(CHUNK as u32 + 3));
        assert!(c.iter().enumerate().all(|(i, v)| i as u32 == v));
        assert_eq!(c.get(CHUNK * 3), None);
    }

    #[test]
    fn appended_columns_read_back_in_order() {
        for (a, b) in [
            (0, 5),
            (3, CHUNK * 2 + 1),
            (CHUNK, CHUNK),
            (CHUNK - 1, 2),
            (7, 0),
        ] {
            let mut c: Column<u32> = (0..a as u32).collect();
            c.append((a as u32..(a + b) as u32).collect());
            c.push((a + b) as u32);
            let n = a + b + 1;
            assert_eq!(c.len(), n);
            assert!(
                c.iter().enumerate().all(|(i, v)| i as u32 == v),
                "{a} + {b}"
            );
            assert!((0..n).all(|i| c.get(i) == Some(i as u32)), "{a} + {b}");
            assert_eq!(c.get(n), None);
            assert_eq!(c.to_vec().len(), n);
        }
    }
}
