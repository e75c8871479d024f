//! The catalogue of bad input: each case must give a clear error (never a
//! panic, never a non-finite number shown as a value) whose message or hint
//! contains the expected fragment, at the expected line:column.

use siccant::session::Session;

/// (worksheet text, line, column, fragment of the message or a hint)
const CASES: &[(&str, usize, usize, &str)] = &[
    // unknown units, with suggestions
    ("x = 3 kgg", 1, 7, "unknown unit `kgg`"),
    ("x = 3 kgg", 1, 7, "did you mean `kg`?"),
    ("x = 3 m\ny = x as fet", 2, 10, "unknown unit `fet`"),
    ("x = 3 kg/mm^2/sx", 1, 15, "unknown unit `sx`"),
    // dimension mismatches, both dimensions in words
    ("a = 2 m + 3 s", 1, 5, "expected length [m], found time [s]"),
    (
        "a = 2 kg - 3 m",
        1,
        5,
        "expected mass [kg], found length [m]",
    ),
    ("check 2 m < 3 s", 1, 7, "time"),
    ("check 20 degC > 3", 1, 7, "temperature"),
    ("x = 3 m as s", 1, 12, "cannot show length [m] in `s`"),
    (
        "q = 2 kW/m^2\ne = 3 kJ/kg\ns = q + e",
        3,
        5,
        "power per area",
    ),
    (
        "q = 2 kW/m^2\ne = 3 kJ/kg\ns = q + e",
        3,
        5,
        "energy per mass",
    ),
    // kinds: temperatures and moisture bases
    (
        "b = 20 degC + 10 degC",
        1,
        5,
        "cannot add two absolute temperatures",
    ),
    ("m = 0.2 db + 0.01 kg/kg_da", 1, 5, "humidity ratio"),
    // arithmetic that has no finite answer
    ("y = 5 m / 0", 1, 5, "division by zero"),
    ("x = 2^(3 m)", 1, 5, "exponent"),
    ("x = ln(3 m)", 1, 8, "needs a plain number"),
    ("x = sqrt(-4)", 1, 10, "negative"),
    ("x = ln(0)", 1, 8, "not positive"),
    ("x = 1e999", 1, 5, "too large"),
    // names
    ("y = zz + 1", 1, 5, "`zz` is not defined"),
    (
        "length = 2 m\ny = lenght * 2",
        2,
        5,
        "did you mean `length`?",
    ),
    ("x = 14 kg / m^2", 1, 13, "`m` is a unit"),
    ("y = sqrtt(4)", 1, 5, "unknown function `sqrtt`"),
    ("y = sqrtt(4)", 1, 5, "did you mean `sqrt`?"),
    ("v = 2\ny = v(3)", 2, 5, "is a value, not a function"),
    ("f(x) = x\ny = f + 1", 2, 5, "is a function"),
    // the dependency graph
    ("a = b\nb = a", 1, 1, "cycle: a -> b -> a"),
    ("a = a + 1", 1, 1, "depends on itself"),
    ("x = 1\nx = 2", 2, 1, "`x` is defined twice"),
    ("input x = 1\nx = 2", 2, 1, "defined twice"),
    ("f(a) = 1\nf(b) = 2", 2, 1, "defined twice"),
    // malformed text
    ("x = 1.2.3", 1, 5, "malformed number `1.2.3`"),
    ("x = 1e", 1, 5, "malformed number"),
    ("x = \"abc", 1, 5, "unterminated string"),
    ("x = (1 + 2", 1, 5, "unclosed `(`"),
    ("x = [1, 2", 1, 5, "unclosed `[`"),
    ("x = 1)", 1, 6, "unexpected `)`"),
    ("x = (1]", 1, 7, "does not match"),
    ("x = ", 1, 5, "expected a value"),
    ("x = 2 m 3", 1, 9, "expected"),
    ("check a = 3", 1, 9, "write `==`"),
    ("x = 2 +* 3", 1, 8, "expected a value"),
    ("y = 3\n\nz = (2 *\n 4", 3, 5, "unclosed `(`"),
    // arguments of built-ins and user functions
    ("x = sqrt(y: 4)", 1, 10, "has no argument named `y`"),
    ("x = linspace(1, 2)", 1, 5, "needs the argument `n`"),
    ("x = sqrt(1, 2)", 1, 13, "takes at most 1"),
    ("x = sqrt(x: 1, x: 2)", 1, 16, "given twice"),
    ("f(a, b) = a + b\ny = f(1)", 2, 5, "needs the argument `b`"),
    ("f(a) = a\ny = f(b: 1)", 2, 7, "has no parameter named `b`"),
    ("f(a) = a\ny = f(1, 2)", 2, 10, "takes 1 argument"),
    ("x = min(1 m, 2 s)", 1, 14, "time"),
    // records, lists, truth values
    ("x = 2 m\ny = x.T", 2, 5, "reads a field of a record"),
    ("r = {a: 1}\ny = r.b", 2, 7, "has no field `b`"),
    ("check 3 m", 1, 7, "needs a truth value"),
    ("x = 1 and true", 1, 5, "needs a truth value"),
    ("x = if 2 then 1 else 0", 1, 8, "needs a truth value"),
    ("x = [1, 2] + [1, 2, 3]", 1, 5, "different lengths"),
    ("x = \"a\" + 1", 1, 5, "cannot combine"),
    ("then = 3", 1, 1, "is a keyword"),
    ("a = 80 °C", 1, 8, "degC"),
    ("b = 3 m²", 1, 8, "`^`"),
    ("d = 5,5", 1, 6, "decimal separator"),
    // limits
    ("f(x) = f(x)\ny = f(1)", 1, 8, "nested deeper"),
    // loading
    (
        "x = load(\"no_such_sheet.sicc\")",
        1,
        10,
        "cannot find worksheet",
    ),
    ("x = load(3)", 1, 10, "path as text"),
];

fn location_and_text(src: &str) -> Vec<(usize, usize, String)> {
    let mut session = Session::with_file("bad.sicc");
    match session.eval(src) {
        Ok(out) => panic!("`{src}` should fail, but gave {} items", out.items.len()),
        Err(diags) => diags
            .iter()
            .map(|d| {
                let (l, c) = session.sources().line_col(d.span);
                let hints: Vec<&str> = d.hints.iter().map(|(_, h)| h.as_str()).collect();
                (l, c, format!("{} | {}", d.message, hints.join(" | ")))
            })
            .collect(),
    }
}

#[test]
fn catalogue_has_at_least_forty_cases() {
    assert!(CASES.len() >= 40, "only {} cases", CASES.len());
}

#[test]
fn every_bad_input_gives_a_clear_error_at_its_place() {
    let mut failures = Vec::new();
    for (src, line, col, fragment) in CASES {
        let found = std::panic::catch_unwind(|| location_and_text(src));
        match found {
            Err(_) => failures.push(format!("`{src}` panicked")),
            Ok(diags) => {
                let hit = diags
                    .iter()
                    .any(|(l, c, text)| l == line && c == col && text.contains(fragment));
                if !hit {
                    failures.push(format!(
                        "`{src}`: want {line}:{col} containing `{fragment}`, got {diags:?}"
                    ));
                }
            }
        }
    }
    assert!(
        failures.is_empty(),
        "{} of {} cases failed:\n{}",
        failures.len(),
        CASES.len(),
        failures.join("\n")
    );
}

#[test]
fn deep_recursion_through_deep_bodies_stops_with_an_error() {
    // 250 nested negations inside a function that calls itself: the
    // evaluator must stop before the native stack does (this runs on a
    // test thread with the default, small stack).
    let body = format!("{}f(x)", "- ".repeat(250));
    let src = format!("f(x) = {body}\ny = f(1)");
    let diags = location_and_text(&src);
    assert!(
        diags.iter().any(|(_, _, t)| t.contains("nested")),
        "{diags:?}"
    );
}

#[test]
fn a_long_chain_defined_backwards_evaluates() {
    let mut src = String::from("z = a3000 + 1\n");
    for i in (1..=3000).rev() {
        src.push_str(&format!("a{i} = a{} + 1\n", i - 1));
    }
    src.push_str("a0 = 0\n");
    let mut session = Session::with_file("chain.sicc");
    assert!(session.eval(&src).is_ok());
}

#[test]
fn deep_nesting_is_refused_not_overflowed() {
    let src = format!("x = {}1{}", "(".repeat(100), ")".repeat(100));
    let diags = location_and_text(&src);
    assert!(
        diags.iter().any(|(_, _, t)| t.contains("nested deeper")),
        "{diags:?}"
    );
    let long = format!("x = 1{}", " + 1".repeat(1000));
    let diags = location_and_text(&long);
    assert!(
        diags.iter().any(|(_, _, t)| t.contains("terms")),
        "{diags:?}"
    );
}
