//! Reading a decimal number as chemists write it, with clear refusals for
//! what is not a finite value (`nan`, `inf`, `1e400`).

use std::ops::Range;

/// Why a number text was rejected, and where.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct NumberError {
    /// Byte range in the text (on character boundaries).
    pub span: Range<usize>,
    /// What is wrong (no trailing period).
    pub message: String,
}

impl std::fmt::Display for NumberError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for NumberError {}

/// Parses `[sign] digits [. digits] [e|E [sign] digits]` (or `.5`) into a
/// finite `f64`.
///
/// The Unicode minus sign `−` (U+2212), as pasted from typeset tables, is
/// read as `-`. Leading and trailing whitespace is ignored. `nan`,
/// `inf`, `infinity`, values beyond the `f64` range (`1e400`) and nonzero
/// values that round to zero (`1e-400`) are errors, never silently kept.
pub fn parse_number(text: &str) -> Result<f64, NumberError> {
    let start = text.len() - text.trim_start().len();
    let body = text.trim();
    let span = start..start + body.len();
    if body.is_empty() {
        return Err(NumberError {
            span: text.len()..text.len(),
            message: "expected a number".to_string(),
        });
    }
    let lower = body.to_ascii_lowercase();
    let unsigned = lower.trim_start_matches(['+', '-']);
    if matches!(unsigned, "nan" | "inf" | "infinity") {
        return Err(NumberError {
            span,
            message: format!("`{body}` is not a finite number: give a value"),
        });
    }
    let ascii = body.replace('\u{2212}', "-");
    if let Some(bad) = first_bad_char(&ascii) {
        let offset = map_offset(body, &ascii, bad);
        let len = body[offset..].chars().next().map_or(1, char::len_utf8);
        return Err(NumberError {
            span: start + offset..start + offset + len,
            message: format!("`{body}` is not a number"),
        });
    }
    let value: f64 = ascii.parse().map_err(|_| NumberError {
        span: span.clone(),
        message: format!("`{body}` is not a number"),
    })?;
    if !value.is_finite() {
        return Err(NumberError {
            span,
            message: format!("`{body}` is too large for a number (the limit is about 1.8e308)"),
        });
    }
    if value == 0.0 && mantissa_is_nonzero(&ascii) {
        return Err(NumberError {
            span,
            message: format!(
                "`{body}` is too small: it rounds to zero (the limit is about 5e-324)"
            ),
        });
    }
    Ok(value)
}

/// The byte offset of the first character that breaks the number grammar,
/// or `None` when the text is well formed.
fn first_bad_char(s: &str) -> Option<usize> {
    let b = s.as_bytes();
    let mut i = 0;
    if i < b.len() && (b[i] == b'+' || b[i] == b'-') {
        i += 1;
    }
    let int_start = i;
    while i < b.len() && b[i].is_ascii_digit() {
        i += 1;
    }
    let mut digits = i - int_start;
    if i < b.len() && b[i] == b'.' {
        i += 1;
        let frac_start = i;
        while i < b.len() && b[i].is_ascii_digit() {
            i += 1;
        }
        digits += i - frac_start;
    }
    if digits == 0 {
        return Some(i.min(s.len().saturating_sub(1)));
    }
    if i < b.len() && (b[i] == b'e' || b[i] == b'E') {
        i += 1;
        if i < b.len() && (b[i] == b'+' || b[i] == b'-') {
            i += 1;
        }
        let exp_start = i;
        while i < b.len() && b[i].is_ascii_digit() {
            i += 1;
        }
        if i == exp_start {
            return Some(i.min(s.len().saturating_sub(1)));
        }
    }
    (i < b.len()).then_some(i)
}

/// Maps a byte offset in the ASCII-minus copy back to the original text
/// (each `−` is three bytes there and one byte in the copy).
fn map_offset(original: &str, ascii: &str, offset: usize) -> usize {
    let mut o = 0;
    let mut a = 0;
    for c in original.chars() {
        if a >= offset {
            break;
        }
        o += c.len_utf8();
        a += if c == '\u{2212}' { 1 } else { c.len_utf8() };
    }
    let _ = ascii;
    o
}

fn mantissa_is_nonzero(s: &str) -> bool {
    s.split(['e', 'E'])
        .next()
        .is_some_and(|m| m.bytes().any(|c| (b'1'..=b'9').contains(&c)))
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;

    #[test]
    fn ordinary_numbers_parse() {
        assert_eq!(parse_number("3.2"), Ok(3.2));
        assert_eq!(parse_number(" -1.5e-3 "), Ok(-1.5e-3));
        assert_eq!(parse_number(".5"), Ok(0.5));
        assert_eq!(parse_number("\u{2212}41.2"), Ok(-41.2));
        assert_eq!(parse_number("0"), Ok(0.0));
    }

    #[test]
    fn non_finite_values_are_refused() {
        for bad in [
            "nan", "NaN", "inf", "-inf", "infinity", "1e400", "-2e999", "1e-400",
        ] {
            let e = parse_number(bad).unwrap_err();
            assert_eq!(e.span, 0..bad.len(), "{bad}");
        }
        assert!(
            parse_number("1e400")
                .unwrap_err()
                .message
                .contains("too large")
        );
        assert!(
            parse_number("1e-400")
                .unwrap_err()
                .message
                .contains("too small")
        );
    }

    #[test]
    fn malformed_numbers_point_at_the_bad_character() {
        assert_eq!(parse_number("1.2.3").unwrap_err().span, 3..4);
        assert_eq!(parse_number("1e").unwrap_err().span, 1..2);
        assert_eq!(parse_number("\u{2212}x").unwrap_err().span, 3..4);
        assert_eq!(parse_number("12µ").unwrap_err().span, 2..4);
        assert!(parse_number("").is_err());
        assert!(parse_number("-").is_err());
    }
}
