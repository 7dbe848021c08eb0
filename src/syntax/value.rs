//! Attribute values: quantities with units and conditions, strings, the
//! `arrhenius(...)` form and bare words.
//!
//! The unit text is kept as written; [`crate::units`] reads it later, so this
//! module only has to find where the number, the unit and `at` begin.

use super::ast::*;
use super::parser::{truncate, unescape};
use crate::span::Span;
use compact_str::CompactString;

/// Parse the text of one value; `base` is its byte offset in the file.
pub fn parse_value(text: &str, base: usize) -> Result<Value, SyntaxError> {
    let span = Span::new(base, base + text.len());
    if text.starts_with('"') {
        return Ok(Value {
            kind: ValueKind::Text(unescape(text)),
            span,
        });
    }
    if let Some(rest) = text.strip_prefix("arrhenius") {
        let trimmed = rest.trim_start();
        if trimmed.starts_with('(') {
            let open = base + text.len() - trimmed.len();
            return arrhenius(trimmed, open, span);
        }
    }
    if number_prefix(text) > 0 {
        let q = quantity(text, base)?;
        return Ok(Value {
            kind: ValueKind::Quantity(q),
            span,
        });
    }
    Ok(Value {
        kind: ValueKind::Word(text.to_string()),
        span,
    })
}

fn arrhenius(text: &str, base: usize, whole: Span) -> Result<Value, SyntaxError> {
    let Some(inner) = text.strip_prefix('(').and_then(|t| t.strip_suffix(')')) else {
        return Err(SyntaxError {
            span: Span::new(base, base + text.len()),
            message: "`arrhenius(` is not closed".into(),
            help: Some("write `arrhenius(A = 1e13 1/s, n = 0, Ea = 80 kJ/mol)`".into()),
        });
    };
    let mut args = Vec::new();
    let mut offset = base + 1;
    for part in inner.split(',') {
        let lead = part.len() - part.trim_start().len();
        let item = part.trim();
        let start = offset + lead;
        offset += part.len() + 1;
        if item.is_empty() {
            continue;
        }
        let Some((name, value)) = item.split_once('=') else {
            return Err(SyntaxError {
                span: Span::new(start, start + item.len()),
                message: format!(
                    "expected `name = value` in `arrhenius`, found `{}`",
                    truncate(item, 30)
                ),
                help: Some("the arguments are `A`, `n` and `Ea`".into()),
            });
        };
        let name_text = name.trim_end();
        let name_span = Span::new(start, start + name_text.len());
        let value_lead = value.len() - value.trim_start().len();
        let value_start = start + name.len() + 1 + value_lead;
        let value_text = value.trim();
        let value = if value_text.is_empty() {
            return Err(SyntaxError {
                span: Span::empty(value_start),
                message: format!("`{}` has no value", truncate(name_text, 20)),
                help: None,
            });
        } else {
            parse_value(value_text, value_start)?
        };
        args.push(Attribute {
            name: Name {
                text: CompactString::from(name_text),
                span: name_span,
            },
            span: name_span.cover(value.span),
            value,
        });
    }
    Ok(Value {
        kind: ValueKind::Arrhenius(args),
        span: whole,
    })
}

/// `NUMBER [UNIT] [at NUMBER [UNIT]]`.
fn quantity(text: &str, base: usize) -> Result<Quantity, SyntaxError> {
    let (main, at) = split_at_keyword(text);
    let q = simple_quantity(main, base)?;
    let at = match at {
        None => None,
        Some(at_offset) => {
            let rest = &text[at_offset + 2..];
            let lead = rest.len() - rest.trim_start().len();
            let rest_trim = rest.trim();
            let rest_base = base + at_offset + 2 + lead;
            if rest_trim.is_empty() || number_prefix(rest_trim) == 0 {
                return Err(SyntaxError {
                    span: Span::new(base + at_offset, base + text.len()),
                    message: "`at` needs a temperature".into(),
                    help: Some("write `at 298.15 K` or `at 25 degC`".into()),
                });
            }
            Some(Box::new(simple_quantity(rest_trim, rest_base)?))
        }
    };
    Ok(Quantity { at, ..q })
}

fn simple_quantity(text: &str, base: usize) -> Result<Quantity, SyntaxError> {
    let text = text.trim_end();
    let n = number_prefix(text);
    let number_text = &text[..n];
    let number_span = Span::new(base, base + n);
    let number = parse_number(number_text, number_span)?;
    let rest = &text[n..];
    let lead = rest.len() - rest.trim_start().len();
    let unit_text = rest.trim();
    let unit = (!unit_text.is_empty()).then(|| Name {
        text: CompactString::from(unit_text),
        span: Span::new(base + n + lead, base + n + lead + unit_text.len()),
    });
    Ok(Quantity {
        number,
        number_span,
        unit,
        at: None,
    })
}

/// Read a number; out-of-range values are errors, not infinities.
pub fn parse_number(text: &str, span: Span) -> Result<f64, SyntaxError> {
    match text.parse::<f64>() {
        Ok(v) if v.is_finite() => Ok(v),
        Ok(_) => Err(SyntaxError {
            span,
            message: format!("the number `{}` is out of range", truncate(text, 30)),
            help: Some("numbers must lie within about ±1.8e308".into()),
        }),
        Err(_) => Err(SyntaxError {
            span,
            message: format!("`{}` is not a number", truncate(text, 30)),
            help: None,
        }),
    }
}

/// The byte offset of a standalone word `at`, if any.
fn split_at_keyword(text: &str) -> (&str, Option<usize>) {
    let bytes = text.as_bytes();
    let mut i = 0;
    while let Some(pos) = memchr::memchr(b'a', &bytes[i..]) {
        let at = i + pos;
        let word = bytes.get(at + 1) == Some(&b't');
        let before_ok = at > 0 && bytes[at - 1].is_ascii_whitespace();
        let after_ok = at + 2 < bytes.len() && bytes[at + 2].is_ascii_whitespace();
        if word && before_ok && after_ok {
            return (&text[..at], Some(at));
        }
        i = at + 1;
    }
    (text, None)
}

/// Length of a leading decimal number (`-41.2`, `1.0e5`, `.5`), 0 if none.
pub fn number_prefix(text: &str) -> usize {
    let b = text.as_bytes();
    let mut i = 0;
    if i < b.len() && (b[i] == b'-' || b[i] == b'+') {
        i += 1;
    }
    let int_start = i;
    while i < b.len() && b[i].is_ascii_digit() {
        i += 1;
    }
    let mut digits = i - int_start;
    if i < b.len() && b[i] == b'.' {
        let frac_start = i + 1;
        let mut j = frac_start;
        while j < b.len() && b[j].is_ascii_digit() {
            j += 1;
        }
        if j > frac_start || digits > 0 {
            digits += j - frac_start;
            i = j;
        }
    }
    if digits == 0 {
        return 0;
    }
    if i < b.len() && (b[i] == b'e' || b[i] == b'E') {
        let mut j = i + 1;
        if j < b.len() && (b[j] == b'-' || b[j] == b'+') {
            j += 1;
        }
        let exp_start = j;
        while j < b.len() && b[j].is_ascii_digit() {
            j += 1;
        }
        if j > exp_start {
            i = j;
        }
    }
    i
}

#[cfg(test)]
mod tests {
    use super::*;

    fn q(text: &str) -> Quantity {
        match parse_value(text, 0).map(|v| v.kind) {
            Ok(ValueKind::Quantity(q)) => q,
            other => panic!("not a quantity: {other:?}"),
        }
    }

    #[test]
    fn a_quantity_with_unit_and_condition() {
        let v = q("-41.2 kJ/mol at 25 degC");
        assert_eq!(v.number, -41.2);
        assert_eq!(v.unit.as_ref().map(|u| u.text.as_str()), Some("kJ/mol"));
        let at = v.at.expect("at");
        assert_eq!(at.number, 25.0);
        assert_eq!(
            at.unit.map(|u| (u.text, u.span)),
            Some(("degC".into(), Span::new(19, 23)))
        );
    }

    #[test]
    fn a_glued_unit_and_a_bare_number() {
        assert_eq!(q("298.15K").unit.map(|u| u.text), Some("K".into()));
        assert!(q("1.0e5").unit.is_none());
    }

    #[test]
    fn out_of_range_numbers_are_errors() {
        assert!(parse_value("1e400", 0).is_err());
    }

    #[test]
    fn arrhenius_arguments_have_spans() {
        let text = "arrhenius(A = 1e13 1/s, n = 0.5, Ea = 80 kJ/mol)";
        let Ok(ValueKind::Arrhenius(args)) = parse_value(text, 10).map(|v| v.kind) else {
            panic!("not arrhenius");
        };
        assert_eq!(args.len(), 3);
        assert_eq!(
            &text[args[2].name.span.start() - 10..args[2].name.span.end() - 10],
            "Ea"
        );
    }
}
