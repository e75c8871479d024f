//! Values as Markdown: quantities as code spans, records as two-column
//! tables, tables via [`table::markdown`](super::table::markdown), plots as
//! images carried inline (SVG in a base64 `data:` URI), so a Markdown file
//! stays self-contained.

use crate::value::{Plot, Record, Value};

use super::table::{self, escape_markdown};

/// A value as Markdown.
pub fn markdown(value: &Value) -> String {
    match value {
        Value::Record(r) => record(r),
        Value::Table(t) => table::markdown(t).unwrap_or_else(|e| {
            format!(
                "*cannot show this table: {}*\n",
                escape_markdown(&e.to_string())
            )
        }),
        Value::Plot(p) => plot(p),
        other => format!("`{}`", super::text(other).replace('`', "'")),
    }
}

fn record(r: &Record) -> String {
    let mut s = format!(
        "*{}*\n\n| field | value |\n| --- | --- |\n",
        escape_markdown(&r.type_name)
    );
    for (name, v) in r.fields.iter() {
        let shown = match v {
            Value::Table(_) | Value::Plot(_) | Value::Record(_) => {
                format!("({})", crate::library::type_word(v))
            }
            other => escape_markdown(&super::text(other).replace('\n', " ")),
        };
        s.push_str(&format!("| {} | {shown} |\n", escape_markdown(name)));
    }
    s
}

/// A plot as an inline SVG image, or its error in italics.
pub fn plot(p: &Plot) -> String {
    match super::svg::svg(p) {
        Ok(svg) => format!(
            "![{}](data:image/svg+xml;base64,{})\n",
            escape_markdown(&p.title),
            base64(svg.as_bytes())
        ),
        Err(e) => format!(
            "*cannot draw this plot: {}*\n",
            escape_markdown(&e.to_string())
        ),
    }
}

/// Standard base64 (RFC 4648, with padding).
pub fn base64(bytes: &[u8]) -> String {
    const ALPHABET: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for chunk in bytes.chunks(3) {
        let b = [
            chunk[0],
            *chunk.get(1).unwrap_or(&0),
            *chunk.get(2).unwrap_or(&0),
        ];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for i in 0..4 {
            if i <= chunk.len() {
                out.push(ALPHABET[(n >> (18 - 6 * i)) as usize & 63] as char);
            } else {
                out.push('=');
            }
        }
    }
    out
}

#[cfg(test)]
mod tests {
    use super::base64;

    #[test]
    fn rfc4648_test_vectors() {
        // RFC 4648, section 10.
        let cases = [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ];
        for (input, expected) in cases {
            assert_eq!(base64(input.as_bytes()), expected);
        }
    }
}
