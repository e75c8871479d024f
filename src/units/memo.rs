//! Per-thread memory of units already looked up or parsed by their text.
//!
//! Looking a symbol up scans the catalogue and its prefixes, and builds the
//! unit's symbol strings; built-ins ask for the same few display units
//! (`kg/(m^2*h)`, `h`, `degC`) on every call, in sweeps hundreds of thousands
//! of times. A unit is the same value every time its text is read, so the
//! first result is kept (cloning a [`Unit`] copies two shared pointers).
//! Only successes are kept; a miss or an error is recomputed with its message.

use std::cell::RefCell;
use std::thread::LocalKey;

use super::Unit;
use crate::eval::FastMap;

/// Most texts kept per table and thread before the table is emptied (it
/// refills on use; this only bounds memory when many distinct texts are read).
pub const MAX_TEXTS: usize = 512;

/// Units by text (hashed with the evaluator's fast word hash: the texts
/// are the program's own and a worksheet's, not hostile keys).
pub type Texts = RefCell<FastMap<String, Unit>>;

/// A table of units by text, one per thread.
pub type Memo = LocalKey<Texts>;

/// The unit remembered for `text`, else `make(text)`, remembered when it succeeds.
pub fn remembered<E>(
    memo: &'static Memo,
    text: &str,
    make: impl FnOnce(&str) -> Result<Unit, E>,
) -> Result<Unit, E> {
    if let Some(u) = memo.with(|m| m.borrow().get(text).cloned()) {
        return Ok(u);
    }
    let unit = make(text)?;
    memo.with(|m| {
        let mut m = m.borrow_mut();
        if m.len() >= MAX_TEXTS {
            m.clear();
        }
        m.insert(text.to_string(), unit.clone());
    });
    Ok(unit)
}

#[cfg(test)]
mod tests {
    use super::*;

    thread_local! {
        static TEST_MEMO: Texts = RefCell::new(FastMap::default());
    }

    #[test]
    fn remembers_successes_only_and_stays_bounded() {
        let mut calls = 0;
        let mut make = |t: &str| {
            calls += 1;
            if t == "bad" {
                Err(())
            } else {
                Ok(Unit::one())
            }
        };
        assert!(remembered(&TEST_MEMO, "x", &mut make).is_ok());
        assert!(remembered(&TEST_MEMO, "x", &mut make).is_ok());
        assert!(remembered(&TEST_MEMO, "bad", &mut make).is_err());
        assert!(remembered(&TEST_MEMO, "bad", &mut make).is_err());
        assert_eq!(
            calls, 3,
            "the second `x` comes from memory, each `bad` is recomputed"
        );
        for i in 0..(MAX_TEXTS + 10) {
            let _ = remembered(&TEST_MEMO, &format!("u{i}"), |_| Ok::<_, ()>(Unit::one()));
        }
        assert!(TEST_MEMO.with(|m| m.borrow().len()) <= MAX_TEXTS);
    }
}
