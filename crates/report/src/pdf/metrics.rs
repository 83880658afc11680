//! Helvetica glyph widths (the standard 14 fonts' published metrics, in 1/1000 em) for
//! wrapping and right-aligning text, and the mapping of text to the WinAnsi encoding the PDF's
//! fonts use.

/// Widths of WinAnsi codes 32..=126 in Helvetica.
const HELVETICA: [u16; 95] = [
    278, 278, 355, 556, 556, 889, 667, 191, 333, 333, 389, 584, 278, 333, 278,
    278, // space../
    556, 556, 556, 556, 556, 556, 556, 556, 556, 556, // 0-9
    278, 278, 584, 584, 584, 556, 1015, // :;<=>?@
    667, 667, 722, 722, 667, 611, 778, 722, 278, 500, 667, 556, 833, 722, 778, 667, 778, 722, 667,
    611, 722, 667, 944, 667, 667, 611, // A-Z
    278, 278, 278, 469, 556, 333, // [\]^_`
    556, 556, 500, 556, 556, 278, 556, 556, 222, 222, 500, 222, 833, 556, 556, 556, 556, 333, 500,
    278, 556, 500, 722, 500, 500, 500, // a-z
    334, 260, 334, 584, // {|}~
];

/// Widths of the same codes in Helvetica-Bold.
const HELVETICA_BOLD: [u16; 95] = [
    278, 333, 474, 556, 556, 889, 722, 238, 333, 333, 389, 584, 278, 333, 278,
    278, // space../
    556, 556, 556, 556, 556, 556, 556, 556, 556, 556, // 0-9
    333, 333, 584, 584, 584, 611, 975, // :;<=>?@
    722, 722, 722, 722, 667, 611, 778, 722, 278, 556, 722, 611, 833, 722, 778, 667, 778, 722, 667,
    611, 722, 667, 944, 667, 667, 611, // A-Z
    333, 278, 333, 584, 556, 333, // [\]^_`
    556, 611, 556, 611, 556, 333, 611, 611, 278, 278, 556, 278, 889, 611, 611, 611, 611, 389, 556,
    333, 611, 556, 778, 556, 556, 500, // a-z
    389, 280, 389, 584, // {|}~
];

/// Text as WinAnsi bytes. Characters the encoding lacks are spelled in ASCII (− as -, ≥ as
/// >=, × kept, Δ as d); anything else becomes '?'.
#[must_use]
pub fn win_ansi(text: &str) -> Vec<u8> {
    let mut out = Vec::with_capacity(text.len());
    for c in text.chars() {
        let code = c as u32;
        match c {
            ' '..='~' | '\u{a0}'..='\u{ff}' => out.push(code as u8),
            '€' => out.push(0x80),
            '…' => out.push(0x85),
            '‘' => out.push(0x91),
            '’' => out.push(0x92),
            '“' => out.push(0x93),
            '”' => out.push(0x94),
            '•' => out.push(0x95),
            '–' => out.push(0x96),
            '—' => out.push(0x97),
            '−' => out.push(b'-'),
            '≥' => out.extend_from_slice(b">="),
            '≤' => out.extend_from_slice(b"<="),
            '≈' => out.push(b'~'),
            'Δ' => out.push(b'd'),
            '→' => out.extend_from_slice(b"->"),
            '\t' | '\n' | '\r' => out.push(b' '),
            _ => out.push(b'?'),
        }
    }
    out
}

/// Width of `text` at `size` points.
#[must_use]
pub fn width(text: &str, size: f32, bold: bool) -> f32 {
    let table = if bold { &HELVETICA_BOLD } else { &HELVETICA };
    let units: u32 = win_ansi(text)
        .iter()
        .map(|&b| match b {
            32..=126 => u32::from(table[usize::from(b - 32)]),
            0x97 | 0x85 => 1000,
            _ => 556,
        })
        .sum();
    units as f32 * size / 1000.0
}

/// Breaks `text` into lines no wider than `max` points; a word longer than a line is cut.
#[must_use]
pub fn wrap(text: &str, size: f32, bold: bool, max: f32) -> Vec<String> {
    let mut lines = Vec::new();
    for paragraph in text.split('\n') {
        let mut line = String::new();
        for word in paragraph.split(' ') {
            let candidate = if line.is_empty() {
                word.to_owned()
            } else {
                format!("{line} {word}")
            };
            if width(&candidate, size, bold) <= max || line.is_empty() {
                line = candidate;
            } else {
                lines.push(std::mem::take(&mut line));
                word.clone_into(&mut line);
            }
            while width(&line, size, bold) > max && line.chars().count() > 1 {
                let mut cut = String::new();
                for c in line.chars() {
                    let mut next = cut.clone();
                    next.push(c);
                    if width(&next, size, bold) > max && !cut.is_empty() {
                        break;
                    }
                    cut = next;
                }
                let rest = line[cut.len()..].to_owned();
                lines.push(cut);
                line = rest;
            }
        }
        lines.push(line);
    }
    lines
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn digits_are_tabular_and_wrapping_respects_the_width() {
        assert!((width("0123456789", 10.0, false) - 55.6).abs() < 1e-4);
        let lines = wrap(
            "the quick brown fox jumps over the lazy dog",
            10.0,
            false,
            60.0,
        );
        assert!(lines.len() > 2);
        assert!(lines.iter().all(|l| width(l, 10.0, false) <= 60.0));
        assert_eq!(
            lines.join(" "),
            "the quick brown fox jumps over the lazy dog"
        );
    }

    #[test]
    fn text_outside_win_ansi_is_spelled_out() {
        assert_eq!(win_ansi("a − b ≥ 2 × 3"), b"a - b >= 2 \xd7 3".to_vec());
    }
}
