//! The fonts the figures and the PDF are set in, compiled into the binary.
//!
//! DejaVu Sans in its regular, bold and oblique faces (from Debian's
//! fonts-dejavu-core; licence in `assets/fonts/DejaVuSans-LICENSE.txt`). The PDF
//! stage hands all three to Typst, so headings and lead-ins are truly bold and
//! emphasis truly oblique on every machine; the report lists each file's SHA-256
//! in its provenance table.

use crate::digest::sha256_hex;

/// One bundled font file.
#[derive(Debug, Clone, Copy)]
pub struct Font {
    /// File name, as written for Typst's font path.
    pub file: &'static str,
    /// The file's bytes.
    pub bytes: &'static [u8],
}

/// The regular face: the figures' text is measured with it.
pub const REGULAR: Font = Font {
    file: "DejaVuSans.ttf",
    bytes: include_bytes!("../../assets/fonts/DejaVuSans.ttf"),
};

/// The bold face: headings, table headers, lead-ins.
pub const BOLD: Font = Font {
    file: "DejaVuSans-Bold.ttf",
    bytes: include_bytes!("../../assets/fonts/DejaVuSans-Bold.ttf"),
};

/// The oblique face: emphasis.
pub const OBLIQUE: Font = Font {
    file: "DejaVuSans-Oblique.ttf",
    bytes: include_bytes!("../../assets/fonts/DejaVuSans-Oblique.ttf"),
};

/// Every bundled font, in the order the provenance lists them.
pub const ALL: [Font; 3] = [REGULAR, BOLD, OBLIQUE];

/// The font file's SHA-256 (hex).
pub fn sha256(f: Font) -> String {
    sha256_hex(f.bytes)
}
