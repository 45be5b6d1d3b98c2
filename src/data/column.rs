//! A growable column stored in fixed-size chunks.
//!
//! A `Vec` that doubles can hold up to twice the memory it needs while it grows;
//! with ten million rows that slack alone would break the memory target. Chunks of
//! fixed size cap the slack at one chunk per column.

const CHUNK: usize = 1 << 13;

/// Values in insertion order, in chunks of 8,192.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Column<T> {
    chunks: Vec<Vec<T>>,
    len: usize,
}

impl<T: Copy> Column<T> {
    /// An empty column.
    pub fn new() -> Self {
        Column {
            chunks: Vec::new(),
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
            }
        }
        self.len += 1;
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
        self.chunks.get(i / CHUNK)?.get(i % CHUNK).copied()
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
}
