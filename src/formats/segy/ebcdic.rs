//! EBCDIC text of the SEG-Y textual header.
//!
//! SEG-Y rev 1 (section 3.1, from memory) asks for the 3200-byte textual header
//! in EBCDIC. We decode with IBM code page 037 (the table below is Python's
//! `cp037` codec, which maps every byte to one of U+0000..U+00FF).
//!
//! Readers disagree on five characters: many (segyio, the classic `dd
//! conv=ascii` table) map EBCDIC 0x4A/0x5A/0x4F/0x5F/0x6A to `[ ] ! ^ |`, while
//! code page 037 puts `[ ] ! ^ |` at 0xBA/0xBB/0x5A/0xB0/0x4F. When we *write*
//! we therefore avoid those five characters (see [`encode_text_char`]), so
//! every reader decodes our headers the same way.

/// Code page 037: EBCDIC byte -> Unicode scalar (generated from Python's `cp037` codec).
pub(crate) const CP037: [char; 256] = [
    '\u{0000}', '\u{0001}', '\u{0002}', '\u{0003}', '\u{009C}', '\u{0009}', '\u{0086}',
    '\u{007F}', // 0x00
    '\u{0097}', '\u{008D}', '\u{008E}', '\u{000B}', '\u{000C}', '\u{000D}', '\u{000E}',
    '\u{000F}', // 0x08
    '\u{0010}', '\u{0011}', '\u{0012}', '\u{0013}', '\u{009D}', '\u{0085}', '\u{0008}',
    '\u{0087}', // 0x10
    '\u{0018}', '\u{0019}', '\u{0092}', '\u{008F}', '\u{001C}', '\u{001D}', '\u{001E}',
    '\u{001F}', // 0x18
    '\u{0080}', '\u{0081}', '\u{0082}', '\u{0083}', '\u{0084}', '\u{000A}', '\u{0017}',
    '\u{001B}', // 0x20
    '\u{0088}', '\u{0089}', '\u{008A}', '\u{008B}', '\u{008C}', '\u{0005}', '\u{0006}',
    '\u{0007}', // 0x28
    '\u{0090}', '\u{0091}', '\u{0016}', '\u{0093}', '\u{0094}', '\u{0095}', '\u{0096}',
    '\u{0004}', // 0x30
    '\u{0098}', '\u{0099}', '\u{009A}', '\u{009B}', '\u{0014}', '\u{0015}', '\u{009E}',
    '\u{001A}', // 0x38
    '\u{0020}', '\u{00A0}', '\u{00E2}', '\u{00E4}', '\u{00E0}', '\u{00E1}', '\u{00E3}',
    '\u{00E5}', // 0x40
    '\u{00E7}', '\u{00F1}', '\u{00A2}', '\u{002E}', '\u{003C}', '\u{0028}', '\u{002B}',
    '\u{007C}', // 0x48
    '\u{0026}', '\u{00E9}', '\u{00EA}', '\u{00EB}', '\u{00E8}', '\u{00ED}', '\u{00EE}',
    '\u{00EF}', // 0x50
    '\u{00EC}', '\u{00DF}', '\u{0021}', '\u{0024}', '\u{002A}', '\u{0029}', '\u{003B}',
    '\u{00AC}', // 0x58
    '\u{002D}', '\u{002F}', '\u{00C2}', '\u{00C4}', '\u{00C0}', '\u{00C1}', '\u{00C3}',
    '\u{00C5}', // 0x60
    '\u{00C7}', '\u{00D1}', '\u{00A6}', '\u{002C}', '\u{0025}', '\u{005F}', '\u{003E}',
    '\u{003F}', // 0x68
    '\u{00F8}', '\u{00C9}', '\u{00CA}', '\u{00CB}', '\u{00C8}', '\u{00CD}', '\u{00CE}',
    '\u{00CF}', // 0x70
    '\u{00CC}', '\u{0060}', '\u{003A}', '\u{0023}', '\u{0040}', '\u{0027}', '\u{003D}',
    '\u{0022}', // 0x78
    '\u{00D8}', '\u{0061}', '\u{0062}', '\u{0063}', '\u{0064}', '\u{0065}', '\u{0066}',
    '\u{0067}', // 0x80
    '\u{0068}', '\u{0069}', '\u{00AB}', '\u{00BB}', '\u{00F0}', '\u{00FD}', '\u{00FE}',
    '\u{00B1}', // 0x88
    '\u{00B0}', '\u{006A}', '\u{006B}', '\u{006C}', '\u{006D}', '\u{006E}', '\u{006F}',
    '\u{0070}', // 0x90
    '\u{0071}', '\u{0072}', '\u{00AA}', '\u{00BA}', '\u{00E6}', '\u{00B8}', '\u{00C6}',
    '\u{00A4}', // 0x98
    '\u{00B5}', '\u{007E}', '\u{0073}', '\u{0074}', '\u{0075}', '\u{0076}', '\u{0077}',
    '\u{0078}', // 0xA0
    '\u{0079}', '\u{007A}', '\u{00A1}', '\u{00BF}', '\u{00D0}', '\u{00DD}', '\u{00DE}',
    '\u{00AE}', // 0xA8
    '\u{005E}', '\u{00A3}', '\u{00A5}', '\u{00B7}', '\u{00A9}', '\u{00A7}', '\u{00B6}',
    '\u{00BC}', // 0xB0
    '\u{00BD}', '\u{00BE}', '\u{005B}', '\u{005D}', '\u{00AF}', '\u{00A8}', '\u{00B4}',
    '\u{00D7}', // 0xB8
    '\u{007B}', '\u{0041}', '\u{0042}', '\u{0043}', '\u{0044}', '\u{0045}', '\u{0046}',
    '\u{0047}', // 0xC0
    '\u{0048}', '\u{0049}', '\u{00AD}', '\u{00F4}', '\u{00F6}', '\u{00F2}', '\u{00F3}',
    '\u{00F5}', // 0xC8
    '\u{007D}', '\u{004A}', '\u{004B}', '\u{004C}', '\u{004D}', '\u{004E}', '\u{004F}',
    '\u{0050}', // 0xD0
    '\u{0051}', '\u{0052}', '\u{00B9}', '\u{00FB}', '\u{00FC}', '\u{00F9}', '\u{00FA}',
    '\u{00FF}', // 0xD8
    '\u{005C}', '\u{00F7}', '\u{0053}', '\u{0054}', '\u{0055}', '\u{0056}', '\u{0057}',
    '\u{0058}', // 0xE0
    '\u{0059}', '\u{005A}', '\u{00B2}', '\u{00D4}', '\u{00D6}', '\u{00D2}', '\u{00D3}',
    '\u{00D5}', // 0xE8
    '\u{0030}', '\u{0031}', '\u{0032}', '\u{0033}', '\u{0034}', '\u{0035}', '\u{0036}',
    '\u{0037}', // 0xF0
    '\u{0038}', '\u{0039}', '\u{00B3}', '\u{00DB}', '\u{00DC}', '\u{00D9}', '\u{00DA}',
    '\u{009F}', // 0xF8
];

/// Decode one EBCDIC (code page 037) byte; control characters become a space.
#[allow(dead_code)] // used by the reader (next commit)
pub(crate) fn decode_ebcdic(b: u8) -> char {
    let c = CP037[b as usize];
    if c.is_control() {
        ' '
    } else {
        c
    }
}

/// Decode one ASCII / Latin-1 byte; control characters become a space.
#[allow(dead_code)] // used by the reader (next commit)
pub(crate) fn decode_ascii(b: u8) -> char {
    let c = char::from(b);
    if c.is_control() {
        ' '
    } else {
        c
    }
}

/// The character we actually write for `c`: printable ASCII passes, except the
/// five whose EBCDIC code differs between common tables (`[` `]` become `(` `)`,
/// `!` `^` `|` become `?`); anything else (non-ASCII, control) becomes `?`.
pub(crate) fn safe_text_char(c: char) -> char {
    match c {
        '[' => '(',
        ']' => ')',
        '!' | '^' | '|' => '?',
        ' '..='~' => c,
        _ => '?',
    }
}

/// EBCDIC (code page 037) byte of `c` after [`safe_text_char`].
pub(crate) fn encode_text_char(c: char) -> u8 {
    let c = safe_text_char(c);
    // Every safe character is in the table (it is a bijection onto U+0000..U+00FF).
    CP037
        .iter()
        .position(|&t| t == c)
        .map(|p| p as u8)
        .unwrap_or(0x6F) // '?' in code page 037
}

/// Whether 3200 header bytes look like EBCDIC rather than ASCII.
///
/// Common practice: a rev 1 header starts with `C` (0xC3 in EBCDIC, 0x43 in
/// ASCII). Otherwise we count bytes that decode to printable ASCII under each
/// interpretation, and EBCDIC spaces (0x40) against ASCII spaces (0x20).
#[allow(dead_code)] // used by the reader (next commit)
pub(crate) fn looks_like_ebcdic(bytes: &[u8]) -> bool {
    match bytes.first() {
        Some(0xC3) => return true,
        Some(0x43) => return false,
        _ => {}
    }
    let mut ebcdic = 0usize;
    let mut ascii = 0usize;
    for &b in bytes {
        let e = CP037[b as usize];
        if e == ' ' || e.is_ascii_alphanumeric() {
            ebcdic += 1;
        }
        let a = char::from(b);
        if a == ' ' || a.is_ascii_alphanumeric() {
            ascii += 1;
        }
    }
    ebcdic > ascii
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_is_a_bijection_and_letters_are_where_ebcdic_puts_them() {
        // EBCDIC letters in three runs (IBM code page 037; common practice, from memory):
        // A-I 0xC1-0xC9, J-R 0xD1-0xD9, S-Z 0xE2-0xE9, digits 0xF0-0xF9, space 0x40.
        let runs = [
            (0xC1u8, 'A', 9),
            (0xD1, 'J', 9),
            (0xE2, 'S', 8),
            (0xF0, '0', 10),
        ];
        for (start, first, n) in runs {
            for k in 0..n {
                let expect = char::from(first as u8 + k);
                assert_eq!(CP037[(start + k) as usize], expect);
                assert_eq!(encode_text_char(expect), start + k);
            }
        }
        assert_eq!(encode_text_char(' '), 0x40);
        let mut seen = [false; 256];
        for c in CP037 {
            let u = c as u32;
            assert!(u < 256);
            assert!(!seen[u as usize]);
            seen[u as usize] = true;
        }
    }

    #[test]
    fn written_characters_round_trip_and_avoid_ambiguous_codes() {
        for c in ' '..='~' {
            let b = encode_text_char(c);
            assert_eq!(decode_ebcdic(b), safe_text_char(c));
            // 0x4A 0x4F 0x5A 0x5F 0x6A 0xB0 0xBA 0xBB are read differently by different tables
            assert!(![0x4A, 0x4F, 0x5A, 0x5F, 0x6A, 0xB0, 0xBA, 0xBB].contains(&b));
        }
        assert_eq!(encode_text_char('é'), encode_text_char('?'));
    }

    #[test]
    fn detection() {
        let e: Vec<u8> = "C 1 SOME HEADER".chars().map(encode_text_char).collect();
        assert!(looks_like_ebcdic(&e));
        assert!(!looks_like_ebcdic(b"C 1 SOME HEADER"));
        let e: Vec<u8> = "  header without card"
            .chars()
            .map(encode_text_char)
            .collect();
        assert!(looks_like_ebcdic(&e));
        assert!(!looks_like_ebcdic(b"  header without card"));
    }
}
