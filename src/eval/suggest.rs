//! "Did you mean ...?": the library's nearest name, kept only when it shares
//! enough with what was written (so `x` never suggests `y`).

/// The closest candidate worth suggesting for a misspelt `name`.
pub fn suggest<'a>(name: &str, candidates: &[&'a str]) -> Option<&'a str> {
    let best = crate::library::closest(name, candidates)?;
    let distance = strsim::damerau_levenshtein(name, best);
    let longer = name.chars().count().max(best.chars().count());
    (distance * 2 <= longer).then_some(best)
}

#[cfg(test)]
mod tests {
    use super::suggest;

    #[test]
    fn suggests_near_misses_only() {
        assert_eq!(suggest("lenght", &["length", "area"]), Some("length"));
        assert_eq!(suggest("lod", &["load", "x"]), Some("load"));
        assert_eq!(suggest("y", &["x"]), None);
        assert_eq!(suggest("m", &["x", "q"]), None);
    }
}
