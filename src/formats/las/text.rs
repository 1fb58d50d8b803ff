//! Bytes to lines: encoding, line ends, whitespace and numbers as LAS files use them.

/// Whitespace as Python's `str.strip()` / regex `\s` see it (lasio trims with
/// them): Unicode White_Space plus the separators U+001C..U+001F.
pub(crate) fn is_ws(c: char) -> bool {
    c.is_whitespace() || ('\u{1c}'..='\u{1f}').contains(&c)
}

/// Trim [`is_ws`] whitespace from both ends.
pub(crate) fn strip(s: &str) -> &str {
    s.trim_matches(is_ws)
}

/// Split on [`is_ws`] runs.
pub(crate) fn tokens(s: &str) -> impl Iterator<Item = &str> {
    s.split(is_ws).filter(|t| !t.is_empty())
}

/// A problem found while decoding: 1-based line and message.
pub(crate) struct DecodeError {
    pub line: Option<usize>,
    pub msg: String,
}

fn line_of(bytes: &[u8], pos: usize) -> usize {
    let mut line = 1;
    let mut k = 0;
    let end = pos.min(bytes.len());
    while k < end {
        match bytes[k] {
            b'\n' => line += 1,
            b'\r' if bytes.get(k + 1) != Some(&b'\n') => line += 1,
            _ => {}
        }
        k += 1;
    }
    line
}

/// Decode a LAS file's bytes to text.
///
/// A UTF-8 byte-order mark is skipped. Control bytes other than tab, CR and
/// LF are refused (binary data); a DOS end-of-file byte 0x1A ends the text when
/// nothing but whitespace follows it. Valid UTF-8 is taken as such, anything
/// else is decoded as Latin-1 (ISO 8859-1: byte value = code point), which never
/// fails, so stray accented bytes in descriptions are kept.
pub(crate) fn decode(bytes: &[u8]) -> Result<String, DecodeError> {
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    if bytes.starts_with(b"LASF") {
        return Err(DecodeError {
            line: None,
            msg: "this is a LiDAR point-cloud file (LASF signature), not a LAS well-log file"
                .into(),
        });
    }
    let mut end = bytes.len();
    for (pos, &b) in bytes.iter().enumerate() {
        let bad = matches!(b, 0x00..=0x08 | 0x0B | 0x0C | 0x0E..=0x19 | 0x1B..=0x1F | 0x7F);
        if bad {
            return Err(DecodeError {
                line: Some(line_of(bytes, pos)),
                msg: format!(
                    "byte 0x{b:02X} is a control character; a LAS file is plain text (is this a binary file?)"
                ),
            });
        }
        if b == 0x1A {
            let rest = bytes.get(pos..).unwrap_or(&[]);
            if rest
                .iter()
                .any(|&c| !matches!(c, 0x1A | b' ' | b'\t' | b'\r' | b'\n'))
            {
                return Err(DecodeError {
                    line: Some(line_of(bytes, pos)),
                    msg: "end-of-file byte 0x1A is followed by more text; expected it only at the end of the file".into(),
                });
            }
            end = pos;
            break;
        }
    }
    let body = bytes.get(..end).unwrap_or(bytes);
    Ok(match std::str::from_utf8(body) {
        Ok(s) => s.to_string(),
        Err(_) => body.iter().map(|&b| char::from(b)).collect(),
    })
}

/// Split text into lines at `\r\n`, `\r` or `\n` (Python's universal newlines).
/// A final line end does not start an extra empty line.
pub(crate) fn split_lines(text: &str) -> Vec<&str> {
    let mut out = Vec::new();
    let b = text.as_bytes();
    let mut start = 0;
    let mut k = 0;
    while k < b.len() {
        match b[k] {
            b'\n' => {
                out.push(text.get(start..k).unwrap_or(""));
                start = k + 1;
            }
            b'\r' => {
                out.push(text.get(start..k).unwrap_or(""));
                if b.get(k + 1) == Some(&b'\n') {
                    k += 1;
                }
                start = k + 1;
            }
            _ => {}
        }
        k += 1;
    }
    if start < b.len() {
        out.push(text.get(start..).unwrap_or(""));
    }
    out
}

/// Parse a decimal number strictly: optional sign, digits with at most one
/// decimal point (at least one digit), optional exponent `e`/`E` with optional
/// sign and digits. `NaN`, `inf`, hexadecimal, digit separators and results
/// that overflow to infinity are refused. Conversion is correctly rounded (Rust
/// `f64::from_str`, as Python's `float`), so equal text gives equal bits.
pub(crate) fn parse_number(s: &str) -> Option<f64> {
    let b = s.as_bytes();
    let mut i = 0;
    if matches!(b.first(), Some(b'+') | Some(b'-')) {
        i += 1;
    }
    let mut digits = 0;
    while b.get(i).is_some_and(u8::is_ascii_digit) {
        i += 1;
        digits += 1;
    }
    if b.get(i) == Some(&b'.') {
        i += 1;
        while b.get(i).is_some_and(u8::is_ascii_digit) {
            i += 1;
            digits += 1;
        }
    }
    if digits == 0 {
        return None;
    }
    if matches!(b.get(i), Some(b'e') | Some(b'E')) {
        i += 1;
        if matches!(b.get(i), Some(b'+') | Some(b'-')) {
            i += 1;
        }
        let mut exp_digits = 0;
        while b.get(i).is_some_and(u8::is_ascii_digit) {
            i += 1;
            exp_digits += 1;
        }
        if exp_digits == 0 {
            return None;
        }
    }
    if i != b.len() {
        return None;
    }
    s.parse::<f64>().ok().filter(|v| v.is_finite())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn lines_and_numbers() {
        assert_eq!(
            split_lines("a\r\nb\rc\n\nd\n"),
            vec!["a", "b", "c", "", "d"]
        );
        assert_eq!(split_lines("a"), vec!["a"]);
        assert_eq!(split_lines(""), Vec::<&str>::new());
        assert_eq!(parse_number("-999.25"), Some(-999.25));
        assert_eq!(parse_number("1.5E-3"), Some(0.0015));
        assert_eq!(parse_number(".5"), Some(0.5));
        assert_eq!(parse_number("5."), Some(5.0));
        for bad in [
            "", "-", ".", "1e", "nan", "inf", "1,5", "1_0", "0x10", "1e999", "1.2.3",
        ] {
            assert_eq!(parse_number(bad), None, "{bad}");
        }
        assert_eq!(decode(b"\xEF\xBB\xBF~V").ok(), Some("~V".to_string()));
        assert_eq!(decode(b"caf\xE9").ok(), Some("caf\u{e9}".to_string()));
        assert_eq!(decode(b"a\n\x00").err().and_then(|e| e.line), Some(2));
        assert_eq!(decode(b"a\n\x1a\r\n").ok(), Some("a\n".to_string()));
    }
}
