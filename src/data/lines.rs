//! File lines for error messages, counted from the bytes themselves.
//!
//! The CSV parser's own line count is off after blank lines and with CRLF line ends
//! (it counts a record's line where it began looking for the record, and a CRLF
//! record's `\n` only with the next record). So the loader notes the byte offset of
//! the record an error concerns, and the line is counted afresh from the file, once,
//! when there is an error to report. A line ends at `\n`, `\r\n` or a lone `\r`.

use std::io::{self, Read};

use super::DataError;

/// An error from reading the records, with the byte offset where the parser began
/// reading its record (before any blank lines that precede it), when it has one.
#[derive(Debug)]
pub(super) struct Located {
    pub error: DataError,
    pub byte: Option<u64>,
}

impl From<DataError> for Located {
    fn from(error: DataError) -> Located {
        Located { error, byte: None }
    }
}

impl Located {
    /// The error with the file line of its record counted from `file`, the same
    /// bytes from the start. If the file cannot be read again the parser's count stays.
    pub fn resolve<R: Read>(self, file: io::Result<R>) -> DataError {
        match (self.byte, file) {
            (Some(byte), Ok(file)) => match line_at(file, byte) {
                Ok(line) => self.error.with_line(line),
                Err(_) => self.error,
            },
            _ => self.error,
        }
    }
}

/// The 1-based line of the first byte at or after `byte` that is not a line end,
/// that is, the line where the record read from `byte` on starts.
pub(super) fn line_at<R: Read>(mut file: R, byte: u64) -> io::Result<u64> {
    let mut line = 1u64;
    let mut pos = 0u64;
    let mut after_cr = false;
    let mut buf = vec![0u8; 1 << 16];
    loop {
        let n = file.read(&mut buf)?;
        if n == 0 {
            return Ok(line);
        }
        for &b in &buf[..n] {
            if after_cr && b != b'\n' {
                line += 1; // a lone `\r`
            }
            after_cr = false;
            if pos >= byte && b != b'\r' && b != b'\n' {
                return Ok(line);
            }
            match b {
                b'\n' => line += 1,
                b'\r' => after_cr = true,
                _ => {}
            }
            pos += 1;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lines_end_at_lf_crlf_or_a_lone_cr() {
        let at = |text: &str, byte: u64| line_at(text.as_bytes(), byte).unwrap();
        // LF, with blank lines before the record at byte 6 ("4" at byte 7).
        assert_eq!(at("h\n1\n2\n\n4\n", 4), 3);
        assert_eq!(at("h\n1\n2\n\n4\n", 6), 5);
        // CRLF: the record at byte 5 starts after two blank lines, on line 5.
        assert_eq!(at("h\r\n1\r\n\r\n\r\n4\r\n", 5), 5);
        assert_eq!(at("h\r\n1\r\n", 3), 2);
        // Lone CR line ends.
        assert_eq!(at("h\r1\r\r3\r", 4), 4);
        // Past the end: the line after the last.
        assert_eq!(at("h\n1\n", 99), 3);
    }
}
