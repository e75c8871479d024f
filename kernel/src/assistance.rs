//! Completion, inspection and completeness: editor help answered from the session.
//!
//! Jupyter counts cursor positions in Unicode code points; the session counts
//! bytes. The conversions live here.

use jupyter_protocol::messaging::{CompleteReply, InspectReply, IsCompleteReply};
use jupyter_protocol::{Media, MediaType};

use crate::api::{Completeness, Session};
use crate::bundle::escape;

/// Byte offset of code point `chars` in `text` (clamped to the end).
pub fn byte_offset(text: &str, chars: usize) -> usize {
    text.char_indices()
        .nth(chars)
        .map_or(text.len(), |(i, _)| i)
}

/// Code point index of byte offset `bytes` in `text` (clamped, rounded down to a boundary).
pub fn char_offset(text: &str, bytes: usize) -> usize {
    let mut b = bytes.min(text.len());
    while !text.is_char_boundary(b) {
        b -= 1;
    }
    text[..b].chars().count()
}

/// Completion matches for the word at `cursor_chars`.
pub fn complete(session: &Session, code: &str, cursor_chars: usize) -> CompleteReply {
    let c = session.complete(code, byte_offset(code, cursor_chars));
    CompleteReply {
        matches: c.matches,
        cursor_start: char_offset(code, c.start),
        cursor_end: char_offset(code, c.end),
        ..Default::default()
    }
}

/// The doc of the name under the cursor, as plain text and preformatted HTML.
pub fn inspect(session: &Session, code: &str, cursor_chars: usize) -> InspectReply {
    match session.inspect(code, byte_offset(code, cursor_chars)) {
        Some(doc) => InspectReply {
            found: true,
            data: Media::new(vec![
                MediaType::Html(format!("<pre class=\"siccant-doc\">{}</pre>", escape(&doc))),
                MediaType::Plain(doc),
            ]),
            ..Default::default()
        },
        None => InspectReply::default(),
    }
}

/// Complete, incomplete (with the indent for the next line) or invalid.
pub fn is_complete(session: &Session, code: &str) -> IsCompleteReply {
    match session.is_complete(code) {
        Completeness::Complete => IsCompleteReply::complete(),
        Completeness::Incomplete { indent } => IsCompleteReply::incomplete(indent),
        Completeness::Invalid => IsCompleteReply::invalid(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn offsets_round_trip_through_multibyte_text() {
        let text = "T = 80 °C + ΔT";
        for chars in 0..=text.chars().count() {
            assert_eq!(char_offset(text, byte_offset(text, chars)), chars);
        }
        assert_eq!(byte_offset(text, 100), text.len());
        assert_eq!(char_offset(text, text.find('C').unwrap()), 8);
    }
}
