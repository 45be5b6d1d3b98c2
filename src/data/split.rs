//! Reading a large file in two halves at once, one per core.
//!
//! Parsing is most of a run's time on large files, and the machines this tool runs on
//! have at least two cores. The file is cut at the first line end after its middle;
//! the first half is read on the calling thread (header included), the second on
//! another, and the two parts are joined in file order. Row numbers and byte
//! offsets in the second part count from its own start and are shifted when it is
//! joined, so every row number, line number and error is the one a single pass
//! would give.
//!
//! A line end is a record boundary only outside quoted fields, so the cut follows the
//! quoting from the file's first byte ([`find_cut`]): a quote opens a field only at
//! its start, `""` inside one is a quote, and a quote followed by a delimiter, a line
//! end or the end of the file closes it. Where a quote stands anywhere else (a stray
//! quote, or text after a closing quote) the reader's own reading of it decides, so
//! no cut is made and the file is read in one pass. The cut depends only on the
//! file's bytes, so the same file gives the same results on every run.

use std::io::{self, Read, Seek, SeekFrom};

use super::{DataError, Dataset, Located, Part, Sorter, csv_reader, one_pass, read_header};
use crate::plan::Plan;

/// Files smaller than this are read in one pass: below it a second thread costs
/// more than it saves.
pub const PARALLEL_MIN_BYTES: u64 = 1 << 20;

/// The UTF-8 byte-order mark.
const BOM: &[u8] = b"\xEF\xBB\xBF";

/// How far past the middle the cut looks for a line end before giving up.
const CUT_SEARCH: usize = 1 << 16;

/// Reads the CSV that `open` opens (`len` bytes long); a file of at least
/// `min_bytes` is read in two halves on two threads (see the module notes). Either
/// way the answer, errors included, is that of one pass over the same bytes.
pub fn load_seekable<R, F>(
    plan: &Plan,
    len: u64,
    min_bytes: u64,
    open: F,
) -> Result<Dataset, DataError>
where
    R: Read + Seek + Send,
    F: Fn() -> io::Result<R> + Sync,
{
    let io = |e: io::Error| DataError::Io(e.to_string());
    let cut = if len >= min_bytes.max(2) {
        find_cut(open().map_err(io)?, len, plan.data.delimiter).map_err(io)?
    } else {
        None
    };
    let read = match cut {
        Some(cut) => in_halves(plan, cut, &open),
        None => None,
    };
    let read = match read {
        Some(read) => read,
        None => one_pass(plan, open().map_err(io)?),
    };
    read.map_err(|e| e.resolve(open()))
}

/// The two-thread reading, cut at byte `cut` (a record boundary); `None` when the
/// header reaches the cut and the file must be read in one pass.
fn in_halves<R, F>(plan: &Plan, cut: u64, open: &F) -> Option<Result<Dataset, Located>>
where
    R: Read + Seek + Send,
    F: Fn() -> io::Result<R> + Sync,
{
    let io = |e: io::Error| Located::from(DataError::Io(e.to_string()));
    let first = match open() {
        Ok(file) => file.take(cut),
        Err(e) => return Some(Err(io(e))),
    };
    let mut csv = csv_reader(plan, true, first);
    // A header that reaches the cut was cut short, and its error may be the cut's
    // doing: one pass reads it whole.
    let columns = read_header(&mut csv);
    let header_end = csv.position().byte();
    let columns = match columns {
        Ok(columns) if header_end < cut => columns,
        _ => return None,
    };
    let sorter = match Sorter::new(plan, &columns) {
        Ok(sorter) => sorter,
        Err(e) => return Some(Err(e.into())),
    };
    let (first, second) = std::thread::scope(|scope| {
        let second = scope.spawn(|| -> Result<Half, Located> {
            let mut file = open().map_err(io)?;
            file.seek(SeekFrom::Start(cut)).map_err(io)?;
            let mut csv = csv_reader(plan, false, file);
            let mut part = sorter.part();
            let read = sorter.read(&mut csv, &mut part);
            Ok(Half { read, part })
        });
        let mut part = sorter.part();
        let read = sorter.read(&mut csv, &mut part);
        let first = Half { read, part };
        let second = second
            .join()
            .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
        (first, second)
    });

    // The cut is a record boundary, so the first half reads exactly as one pass
    // would up to it: its own error stands whatever the second half holds.
    if let Err(e) = first.read {
        return Some(Err(e));
    }
    let second = match second {
        Ok(second) => second,
        Err(e) => return Some(Err(e)),
    };
    let mut part = first.part;
    if let Err(e) = second.read {
        return Some(Err(Located {
            error: e.error.shifted(part.rows_read),
            byte: e.byte.map(|b| b + cut),
        }));
    }
    Some(
        part.append(second.part)
            .and_then(|()| sorter.finish(part))
            .map_err(Located::from),
    )
}

/// One half as read: how the reading ended and what it gave.
struct Half {
    read: Result<(), Located>,
    part: Part,
}

/// Bytes read at a time while following the quoting.
const SCAN_CHUNK: usize = 1 << 20;

/// The byte offset just past the first line end outside quoted fields at or after
/// the middle of the file, followed by at least three bytes and no byte-order mark;
/// `None` when there is none within [`CUT_SEARCH`] bytes of the middle, or when a
/// quote stands where a well-formed file has none (see the module notes). The
/// quoting is followed from the first byte, jumping from quote to quote, so a file
/// without quotes costs one scan for the quote byte up to the middle.
fn find_cut<R: Read>(mut file: R, len: u64, delimiter: u8) -> io::Result<Option<u64>> {
    let middle = len / 2;
    let boundary = |b: u8| b == delimiter || b == b'\n' || b == b'\r';
    let mut buf = vec![0u8; SCAN_CHUNK];
    let mut offset = 0u64;
    let mut in_quotes = false;
    // The byte before the chunk (the start of the file counts as a line end), and
    // a quote inside a quoted field at the end of the last chunk, waiting for the
    // byte that says whether it closes the field or is the first of `""`.
    let mut before = b'\n';
    let mut pending = false;
    loop {
        let mut n = 0;
        while n < buf.len() {
            let got = file.read(&mut buf[n..])?;
            if got == 0 {
                break;
            }
            n += got;
        }
        if n == 0 {
            return Ok(None);
        }
        let chunk = &buf[..n];
        let mut i = if offset == 0 && chunk.starts_with(BOM) {
            BOM.len()
        } else {
            0
        };
        if pending {
            pending = false;
            match chunk[i] {
                b'"' => i += 1,
                b if boundary(b) => in_quotes = false,
                _ => return Ok(None),
            }
        }
        while i < n {
            if in_quotes {
                let Some(q) = memchr::memchr(b'"', &chunk[i..]).map(|q| i + q) else {
                    i = n;
                    break;
                };
                match chunk.get(q + 1) {
                    None => {
                        pending = true;
                        i = n;
                    }
                    Some(b'"') => i = q + 2,
                    Some(&b) if boundary(b) => {
                        in_quotes = false;
                        i = q + 1;
                    }
                    Some(_) => return Ok(None),
                }
                continue;
            }
            // Outside quotes: the next quote, and past the middle the next line end.
            let quote = memchr::memchr(b'"', &chunk[i..]).map(|q| i + q);
            let from = i.max(middle.saturating_sub(offset).min(n as u64) as usize);
            let line_end = memchr::memchr(b'\n', &chunk[from..]).map(|q| from + q);
            match (quote, line_end) {
                (_, Some(e)) if quote.is_none_or(|q| e < q) => {
                    let cut = offset + e as u64 + 1;
                    if cut > middle + CUT_SEARCH as u64 {
                        return Ok(None);
                    }
                    match chunk.get(e + 1..e + 4) {
                        Some(next) if next != BOM && cut < len => return Ok(Some(cut)),
                        _ => i = e + 1,
                    }
                }
                (Some(q), _) => {
                    let prev = if q == 0 { before } else { chunk[q - 1] };
                    let at_field_start =
                        boundary(prev) || (offset == 0 && q == BOM.len() && chunk.starts_with(BOM));
                    if !at_field_start {
                        return Ok(None);
                    }
                    in_quotes = true;
                    i = q + 1;
                }
                (None, _) => i = n,
            }
        }
        before = chunk[n - 1];
        offset += n as u64;
        if offset > middle + CUT_SEARCH as u64 {
            return Ok(None);
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::plan;
    use std::io::Cursor;

    fn plan_with(extra_model: &str, extra_data: &str) -> Plan {
        let text = format!(
            "title = \"t\"\n[data]\npath = \"d.csv\"\nmissing = [\"\", \"NA\"]\n{extra_data}\n[model]\nresponse = \"y\"\ncovariate = \"x\"\ngroup = \"g\"\n{extra_model}\n"
        );
        plan::load("p.toml", &text).unwrap()
    }

    /// Reads `csv` in two halves whatever its size.
    fn in_halves(plan: &Plan, csv: &str) -> Result<Dataset, DataError> {
        let bytes = csv.as_bytes().to_vec();
        load_seekable(plan, bytes.len() as u64, 0, || {
            Ok(Cursor::new(bytes.clone()))
        })
    }

    /// The two readings agree: same rows, groups and values, moments to rounding.
    fn assert_same(plan: &Plan, csv: &str) {
        let one = one_pass(plan, csv.as_bytes()).map_err(|e| e.resolve(Ok(csv.as_bytes())));
        let two = in_halves(plan, csv);
        match (one, two) {
            (Err(a), Err(b)) => assert_eq!(a, b, "errors differ for\n{csv}"),
            (Ok(a), Ok(b)) => {
                assert_eq!(a.rows_read, b.rows_read);
                assert_eq!(a.dropped, b.dropped);
                assert_eq!(a.columns, b.columns);
                assert_eq!(a.groups.len(), b.groups.len());
                for (g, h) in a.groups.iter().zip(&b.groups) {
                    assert_eq!(g.level, h.level);
                    assert_eq!(g.x.to_vec(), h.x.to_vec());
                    assert_eq!(g.y.to_vec(), h.y.to_vec());
                    assert_eq!(g.rows.to_vec(), h.rows.to_vec());
                    let (m, n) = (g.moments, h.moments);
                    assert_eq!(m.n, n.n);
                    for (u, v) in [
                        (m.mean_x, n.mean_x),
                        (m.sxx, n.sxx),
                        (m.sxy, n.sxy),
                        (m.syy, n.syy),
                    ] {
                        assert!((u - v).abs() <= 1e-12 * u.abs().max(1.0), "{u} vs {v}");
                    }
                    assert_eq!((m.min_x, m.max_x), (n.min_x, n.max_x));
                }
            }
            (a, b) => panic!("one reading failed, the other not:\n{a:?}\n{b:?}\nfor\n{csv}"),
        }
    }

    /// `rows` data rows over groups a, b, c with one line each; `row_text` may
    /// replace a row's text.
    fn csv(rows: usize, row_text: impl Fn(usize) -> Option<String>) -> String {
        let mut s = String::from("g,x,y\n");
        for i in 1..=rows {
            let line = row_text(i).unwrap_or_else(|| {
                let g = ["a", "b", "c"][i % 3];
                format!("{g},{},{}", i as f64 * 0.5, 3.0 + i as f64 * 0.25)
            });
            s.push_str(&line);
            s.push('\n');
        }
        s
    }

    #[test]
    fn halves_give_the_one_pass_dataset() {
        let plan = plan_with("", "");
        assert_same(&plan, &csv(40, |_| None));
        // Drops of every kind on both sides of the middle, and a group seen only
        // in the second half.
        assert_same(
            &plan,
            &csv(40, |i| match i {
                3 | 33 => Some("a,NA,1".into()),
                5 | 35 => Some("b,1,".into()),
                7 | 37 => Some(",1,1".into()),
                30..=32 => Some(format!("late,{i},{}", i * 2)),
                _ => None,
            }),
        );
        // Row numbers more than 255 apart within a group, across the cut.
        assert_same(
            &plan,
            &csv(900, |i| (i % 300 != 0).then(|| format!("b,{i},{i}"))),
        );
        let listed = plan_with("levels = [\"c\", \"b\", \"a\"]", "");
        assert_same(&listed, &csv(40, |_| None));
        let kept = plan_with(
            "",
            "[[data.keep]]\ncolumn = \"g\"\none_of = [\"a\", \"c\"]\n",
        );
        assert_same(&kept, &csv(40, |_| None));
    }

    #[test]
    fn errors_in_the_second_half_name_the_rows_a_single_pass_names() {
        let plan = plan_with("", "");
        for bad in ["a,oops,1", "a,1", "a,1,1,1", "a,inf,2"] {
            let text = csv(40, |i| (i == 31).then(|| bad.to_string()));
            assert_same(&plan, &text);
            let e = in_halves(&plan, &text).unwrap_err().to_string();
            assert!(e.contains("data row 31 (file line 32)"), "{e}");
        }
        let listed = plan_with("levels = [\"a\", \"b\", \"c\"]", "");
        assert_same(
            &listed,
            &csv(40, |i| (i == 36).then(|| "d,1,1".to_string())),
        );
        // The first error in the file wins, wherever the other is.
        assert_same(
            &plan,
            &csv(40, |i| match i {
                4 => Some("a,x1,1".into()),
                36 => Some("a,1".into()),
                _ => None,
            }),
        );
        // Blank lines and CRLF line ends before the cut shift the file lines.
        let blank = csv(40, |i| match i {
            3 => Some("a,1,1\n\n".into()), // two blank lines follow
            35 => Some("c,bad,1".into()),
            _ => None,
        });
        for text in [blank.clone(), blank.replace('\n', "\r\n")] {
            assert_same(&plan, &text);
            let e = in_halves(&plan, &text).unwrap_err().to_string();
            assert!(e.contains("data row 35 (file line 38)"), "{e}");
        }
    }

    #[test]
    fn domain_errors_collect_from_both_halves() {
        let plan = plan_with("[model.transform]\nresponse = \"log\"", "");
        let text = csv(40, |i| {
            matches!(i, 2 | 30 | 31 | 32 | 33 | 34 | 39).then(|| format!("a,1,-{i}"))
        });
        assert_same(&plan, &text);
        match in_halves(&plan, &text).unwrap_err() {
            DataError::OutsideDomain { count, rows, .. } => {
                assert_eq!(count, 7);
                assert_eq!(
                    rows.iter().map(|r| r.0).collect::<Vec<_>>(),
                    [2, 30, 31, 32, 33]
                );
            }
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn quoted_line_ends_near_the_cut_read_as_in_one_pass() {
        let plan = plan_with("", "");
        // A quoted field holding a line end right where the cut would fall.
        for at in [2, 19, 20, 21, 39] {
            let text = csv(40, |i| (i == at).then(|| "\"a\",\"1\n\",2".to_string()));
            let text = text.replace("\"1\n\"", "\"1\"\n");
            assert_same(&plan, &text);
            let spanning = csv(40, |i| (i == at).then(|| "\"b\nb\",1,2".to_string()));
            assert_same(&plan, &spanning);
        }
    }

    #[test]
    fn a_quoted_header_reaching_past_the_middle_means_one_pass() {
        // Found by the csv_load fuzz target: the header's open quote swallows the
        // whole file, so the first half's header was cut short.
        let plan = plan_with("", "");
        let text = "g,\"\"\"x,y\na,0.676e-250,3.375e-250\nb,1.327e-250,5.405e-250\nc,5.063e-250,17.126e-250\naa,4.262e-250,6.481e-250\nb,3.835e-250,9.367e-250\n";
        assert_same(&plan, text);
        match in_halves(&plan, text).unwrap_err() {
            DataError::MissingColumn { available, .. } => {
                assert_eq!(available.len(), 2);
                assert!(available[1].ends_with("9.367e-250"), "{available:?}");
            }
            other => panic!("{other:?}"),
        }
        // Found by the same target: bytes that are not UTF-8 in a header that
        // reaches past the middle name the whole header, as in one pass.
        let mut bytes = b"\"ta,,\tg39\0,,\xd4\xcc,".to_vec();
        bytes.extend([0u8; 60]);
        bytes.extend(b"\\\\,,,\0A\xff\x07\ny");
        let one = one_pass(&plan, bytes.as_slice()).map_err(|e| e.resolve(Ok(bytes.as_slice())));
        let two = load_seekable(&plan, bytes.len() as u64, 0, || {
            Ok(Cursor::new(bytes.clone()))
        });
        assert_eq!(one.unwrap_err(), two.unwrap_err());
        // Quotes in a header that ends before the middle keep the two halves.
        assert_same(
            &plan,
            &csv(40, |_| None).replacen("g,x,y", "\"g\",\"x\",\"y\"", 1),
        );
    }

    #[test]
    fn a_byte_order_mark_after_the_middle_stays_in_its_cell() {
        // Found by the csv_load fuzz target: the second half began with a
        // byte-order mark, which its CSV reader dropped, so a label became empty.
        let plan = plan_with(
            "levels = [\"a\", \"b\"]\n[model.transform]\nresponse = \"log\"",
            "",
        );
        let text = "g,x,y\na,22,\n\u{feff},,\u{cd}.58";
        assert_same(&plan, text);
        match in_halves(&plan, text).unwrap_err() {
            DataError::UnlistedLevel { row, label, .. } => {
                assert_eq!((row, label.as_str()), (2, "\u{feff}"))
            }
            other => panic!("{other:?}"),
        }
        let marked = csv(40, |i| (i == 21).then(|| "\u{feff}a,1,1".to_string()));
        assert_same(&plan_with("", ""), &marked);
    }

    #[test]
    fn small_files_and_files_without_a_late_line_end_read_in_one_pass() {
        let plan = plan_with("", "");
        assert_same(&plan, "g,x,y\na,1,2\n");
        assert_same(&plan, "g,x,y\na,1,2\nb,2,3");
        assert_same(&plan, "g,x,y\n");
        assert_same(&plan, "");
        let d = load_seekable(&plan, 20, 1 << 20, || {
            Ok(Cursor::new(b"g,x,y\na,1,2\n".to_vec()))
        })
        .unwrap();
        assert_eq!(d.rows_read, 1);
    }

    /// The byte offsets where a one-pass reader starts each record (the header's
    /// included), from the csv crate itself.
    fn record_starts(text: &str) -> Vec<u64> {
        let mut reader = csv::ReaderBuilder::new()
            .has_headers(false)
            .flexible(true)
            .from_reader(text.as_bytes());
        let mut starts = Vec::new();
        let mut record = csv::ByteRecord::new();
        // A record after a CRLF is placed at its `\n`: its first byte follows it.
        while reader.read_byte_record(&mut record).unwrap() {
            let at = record.position().unwrap().byte();
            starts.push(if text.as_bytes()[at as usize] == b'\n' {
                at + 1
            } else {
                at
            });
        }
        starts
    }

    #[test]
    fn quoted_files_are_cut_at_a_record_boundary_and_read_in_halves() {
        let plan = plan_with("", "");
        // Every field quoted, some holding a delimiter, a doubled quote or a line
        // end, and one long field spanning lines right across the middle.
        let rows = 200;
        let mut text = String::from("\"g\",\"x\",\"y\"\n");
        for i in 0..rows {
            let label = match i % 4 {
                0 => "\"a, b\"".to_string(),
                1 => "\"say \"\"b\"\"\"".to_string(),
                2 => "\"c\nc\"".to_string(),
                _ => "\"\"".to_string(),
            };
            let label = if i == rows / 2 {
                "\"long\nlong\nlong\"".to_string()
            } else {
                label
            };
            text.push_str(&format!("{label},\"{}\",\"{}\"\r\n", i % 9, (i * 7) % 11));
        }
        let cut = find_cut(text.as_bytes(), text.len() as u64, b',').unwrap();
        let cut = cut.expect("a well-formed quoted file is cut");
        assert!(cut >= text.len() as u64 / 2);
        assert!(
            record_starts(&text).contains(&cut),
            "cut {cut} is not a record start"
        );
        assert_same(&plan, &text);
        // The dataset really came from two halves: same as one pass, cut or not.
        let two = in_halves(&plan, &text).unwrap();
        assert_eq!(two.rows_read, rows as u64);
    }

    #[test]
    fn stray_quotes_leave_the_reading_to_one_pass() {
        let plan = plan_with("", "");
        // A quote inside an unquoted field, and text after a closing quote: the
        // reader's own reading of them decides, so no cut is made.
        for stray in ["g,5\",1", "\"g\"x,5,1"] {
            let text = csv(40, |i| (i == 3).then(|| stray.to_string()));
            assert_eq!(
                find_cut(text.as_bytes(), text.len() as u64, b',').unwrap(),
                None,
                "{stray}"
            );
            assert_same(&plan, &text);
        }
        // Quotes that close before the middle leave the cut after it.
        let text = csv(40, |i| (i == 3).then(|| "\"a\",1,2".to_string()));
        let cut = find_cut(text.as_bytes(), text.len() as u64, b',')
            .unwrap()
            .unwrap();
        assert!(record_starts(&text).contains(&cut));
    }
}
