//! Reading a large couple file a few thousand couples at a time, so that the checker holds the
//! file's text and what the table-wide checks keep, never every record of the file at once.
//!
//! A file is cut only where the cut is certain to fall between couples: in TOML before a line
//! that is exactly a `[[couple]]` header, when the file has no multi-line strings and no other
//! table headers; in CSV after a row, found by the same field rules as the couple-file reader
//! (a field that starts with `"` runs to the closing quote, `""` inside it). Each piece goes
//! through the one couple-file reader ([`crate::table::CoupleFile`]) and its spans are moved
//! back to file offsets; a file that cannot be cut safely is read whole. Where to cut comes from
//! the reader's own module (`toml_couple_starts`, `csv_row_starts`), so the two cannot drift.

use crate::table::{CoupleFile, FileFormat, csv_row_starts, toml_couple_starts};

/// Couples per piece: large enough that judging a piece on two cores pays for the threads,
/// small enough that a piece's parse (about twenty times its text) stays a few megabytes.
pub const COUPLES_PER_PIECE: usize = 4096;

/// A piece also ends once it is this long, so that long notes cannot make one piece huge.
const PIECE_BYTES: usize = 2 << 20;

/// Where a file is cut: pieces `bounds[i]..bounds[i + 1]`. For CSV, `header_end` is where the
/// header row (with the comments and blank lines before it) ends; every piece after the first
/// is read with that header in front of it.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Pieces {
    bounds: Vec<usize>,
    /// The index of the first couple of each piece.
    firsts: Vec<usize>,
    header_end: usize,
    couples: usize,
}

pub use crate::table::Uncuttable;

impl Pieces {
    /// How many couples the pieces hold (TOML `[[couple]]` headers, CSV rows).
    pub fn couples(&self) -> usize {
        self.couples
    }

    /// The index (among the file's couples) of the first couple of piece `index`.
    pub fn first(&self, index: usize) -> usize {
        self.firsts[index]
    }

    /// How many pieces.
    pub fn len(&self) -> usize {
        self.bounds.len().saturating_sub(1)
    }

    /// Whether there are no pieces.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Piece `index` of `text` read into records whose spans (and indexes) are those of the
    /// whole file; `first_record` is the number of couples in the pieces before it. Problems
    /// with a CSV header are reported with the first piece only.
    pub fn read(
        &self,
        text: &str,
        format: FileFormat,
        index: usize,
        first_record: usize,
    ) -> CoupleFile {
        let (start, end) = (self.bounds[index], self.bounds[index + 1]);
        if format == FileFormat::Toml || index == 0 {
            let mut file = CoupleFile::from_text(&text[start..end], format);
            file.relocate(&|offset| offset + start, first_record);
            return file;
        }
        let header = &text[..self.header_end];
        let mut piece = String::with_capacity(header.len() + end - start);
        piece.push_str(header);
        piece.push_str(&text[start..end]);
        let mut file = CoupleFile::from_string(piece, format);
        let header_end = self.header_end;
        // The header's own problems and unknown columns were reported with the first piece.
        file.problems.retain(|p| p.span.start >= header_end);
        file.unknown_keys.clear();
        file.relocate(&|offset| offset - header_end + start, first_record);
        file
    }

    /// How to cut `text`, or why it cannot be cut.
    pub fn cut(text: &str, format: FileFormat) -> Result<Pieces, Uncuttable> {
        match format {
            FileFormat::Toml => cut_toml(text),
            FileFormat::Csv => cut_csv(text),
        }
    }
}

/// Piece boundaries from the offsets where couples start: the first piece starts at 0 (with
/// whatever comes before the first couple), a new one every [`COUPLES_PER_PIECE`] couples or
/// [`PIECE_BYTES`] bytes.
fn bounds_from_starts(starts: &[usize], len: usize) -> (Vec<usize>, Vec<usize>) {
    let mut bounds = vec![0];
    let mut firsts = vec![0];
    let mut in_piece = 0;
    for (couple, &start) in starts.iter().enumerate() {
        let piece_start = *bounds.last().unwrap_or(&0);
        if in_piece > 0 && (in_piece == COUPLES_PER_PIECE || start - piece_start >= PIECE_BYTES) {
            bounds.push(start);
            firsts.push(couple);
            in_piece = 0;
        }
        in_piece += 1;
    }
    bounds.push(len);
    (bounds, firsts)
}

fn cut_toml(text: &str) -> Result<Pieces, Uncuttable> {
    let starts = toml_couple_starts(text)?;
    let (bounds, firsts) = bounds_from_starts(&starts, text.len());
    Ok(Pieces {
        bounds,
        firsts,
        header_end: 0,
        couples: starts.len(),
    })
}

fn cut_csv(text: &str) -> Result<Pieces, Uncuttable> {
    let rows = csv_row_starts(text)?;
    // The first row is the header; the first piece holds it and starts at 0.
    let header_end = rows.get(1).copied().unwrap_or(text.len());
    let data = rows.get(1..).unwrap_or(&[]);
    let (bounds, firsts) = bounds_from_starts(data, text.len());
    Ok(Pieces {
        bounds,
        firsts,
        header_end,
        couples: data.len(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Reading piece by piece gives the records (spans included) of reading the whole file.
    fn assert_same_as_whole(text: &str, format: FileFormat) {
        let whole = CoupleFile::from_text(text, format);
        let pieces = Pieces::cut(text, format).unwrap();
        let mut records = Vec::new();
        let mut problems = Vec::new();
        let mut unknown = Vec::new();
        for index in 0..pieces.len() {
            assert_eq!(pieces.first(index), records.len());
            let part = pieces.read(text, format, index, records.len());
            records.extend(part.records);
            problems.extend(part.problems);
            unknown.extend(part.unknown_keys);
        }
        assert_eq!(records, whole.records);
        assert_eq!(problems, whole.problems);
        assert_eq!(unknown, whole.unknown_keys);
        assert_eq!(pieces.couples(), whole.records.len());
    }

    #[test]
    fn pieces_read_as_the_whole_file_does() {
        // Invented entries, enough for several pieces.
        let mut toml = String::from("# invented\n");
        let mut csv = String::from("# invented\r\nid,reaction,e0,colour,source\r\n\r\n");
        for k in 0..(2 * COUPLES_PER_PIECE + 17) {
            toml.push_str(&format!(
                "[[couple]]\nid = \"c{k}\"\nreaction = \"Ag+ + e- -> Ag(s)\"\ne0 = 0.{k}\nsource = \"x\\ty\"\nextra = 1\n\n"
            ));
            csv.push_str(&format!(
                "c{k},\"Ag+ + e- -> Ag(s)\",0.{k},,\"a, \"\"b\"\"\r\nline\"\r\n"
            ));
            if k % 1000 == 0 {
                csv.push_str("# a comment with \" in it\r\nbad,row\r\n");
            }
        }
        assert_same_as_whole(&toml, FileFormat::Toml);
        assert_same_as_whole(&csv, FileFormat::Csv);
    }

    #[test]
    fn files_that_cannot_be_cut_say_why() {
        let text = "[[couple]]\nnote = '''\n[[couple]]\n'''\n";
        assert_eq!(
            Pieces::cut(text, FileFormat::Toml).unwrap_err().reason,
            "a multi-line string"
        );
        let text = "[[couple]]\ne0 = 1\n[other]\n";
        assert_eq!(Pieces::cut(text, FileFormat::Toml).unwrap_err().offset, 18);
        let text = "id,reaction\na,\"open\n";
        assert_eq!(Pieces::cut(text, FileFormat::Csv).unwrap_err().offset, 14);
    }
}
