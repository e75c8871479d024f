//! Input history for `history_request`: tail, range and glob search.

use std::collections::VecDeque;

use jupyter_protocol::messaging::HistoryEntry;
use serde_json::Value as Json;

/// The session number reported in history entries (one kernel run is one session).
pub const SESSION_NUMBER: usize = 1;

/// How many of the most recent cells history keeps, so a long-running kernel's
/// memory stays flat (a front end keeps its own copy of what it sent).
pub const HISTORY_LIMIT: usize = 1000;

/// The most recent cells stored with `store_history`, with their plain-text result.
#[derive(Default)]
pub struct History {
    cells: VecDeque<(usize, String, String)>,
}

impl History {
    /// Record cell `line` with its input and plain-text output, forgetting the
    /// oldest cell beyond [`HISTORY_LIMIT`].
    pub fn push(&mut self, line: usize, input: &str, output: &str) {
        if self.cells.len() == HISTORY_LIMIT {
            self.cells.pop_front();
        }
        self.cells
            .push_back((line, input.to_string(), output.to_string()));
    }

    /// Answer a history request given as raw JSON content.
    pub fn query(&self, request: &Json) -> Vec<HistoryEntry> {
        let output = request
            .get("output")
            .and_then(Json::as_bool)
            .unwrap_or(false);
        let n = request.get("n").and_then(Json::as_u64).map(|n| n as usize);
        let picked: Vec<&(usize, String, String)> =
            match request.get("hist_access_type").and_then(Json::as_str) {
                Some("tail") => self.tail(n.unwrap_or(10)),
                Some("range") => self.range(request),
                Some("search") => self.search(request, n),
                _ => Vec::new(),
            };
        picked.into_iter().map(|cell| entry(cell, output)).collect()
    }

    fn tail(&self, n: usize) -> Vec<&(usize, String, String)> {
        self.cells
            .iter()
            .skip(self.cells.len().saturating_sub(n))
            .collect()
    }

    fn range(&self, request: &Json) -> Vec<&(usize, String, String)> {
        let start = request.get("start").and_then(Json::as_i64).unwrap_or(0);
        let stop = request
            .get("stop")
            .and_then(Json::as_i64)
            .unwrap_or(i64::MAX);
        self.cells
            .iter()
            .filter(|(line, _, _)| (*line as i64) >= start && (*line as i64) < stop)
            .collect()
    }

    fn search(&self, request: &Json, n: Option<usize>) -> Vec<&(usize, String, String)> {
        let pattern = request.get("pattern").and_then(Json::as_str).unwrap_or("*");
        let unique = request
            .get("unique")
            .and_then(Json::as_bool)
            .unwrap_or(false);
        let mut found: Vec<&(usize, String, String)> = Vec::new();
        for cell in self.cells.iter().rev() {
            if glob(pattern, &cell.1) && !(unique && found.iter().any(|c| c.1 == cell.1)) {
                found.push(cell);
            }
        }
        found.truncate(n.unwrap_or(usize::MAX));
        found.reverse();
        found
    }
}

fn entry((line, input, out): &(usize, String, String), output: bool) -> HistoryEntry {
    if output {
        HistoryEntry::InputOutput(SESSION_NUMBER, *line, (input.clone(), out.clone()))
    } else {
        HistoryEntry::Input(SESSION_NUMBER, *line, input.clone())
    }
}

/// Glob match with `*` (any run) and `?` (one character), over the whole text.
pub fn glob(pattern: &str, text: &str) -> bool {
    let p: Vec<char> = pattern.chars().collect();
    let t: Vec<char> = text.chars().collect();
    let (mut pi, mut ti, mut star, mut mark) = (0, 0, None, 0);
    while ti < t.len() {
        if pi < p.len() && p[pi] == '*' {
            star = Some(pi);
            mark = ti;
            pi += 1;
        } else if pi < p.len() && (p[pi] == '?' || p[pi] == t[ti]) {
            pi += 1;
            ti += 1;
        } else if let Some(s) = star {
            pi = s + 1;
            mark += 1;
            ti = mark;
        } else {
            return false;
        }
    }
    p[pi..].iter().all(|&c| c == '*')
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn glob_matches_star_and_question_mark() {
        assert!(glob("1*", "1 + 2"));
        assert!(
            glob("6 *", "6 * 7"),
            "a star in the pattern also matches a literal star"
        );
        assert!(glob("a?c", "abc"));
        assert!(!glob("a?c", "abbc"));
        assert!(glob("*x*", "y = x"));
        assert!(!glob("x", "xx"));
    }

    #[test]
    fn tail_range_and_search_pick_the_right_cells() {
        let mut h = History::default();
        h.push(1, "a = 1", "");
        h.push(2, "a", "1");
        h.push(3, "b = 2", "");
        let lines = |q| {
            h.query(&q)
                .into_iter()
                .map(|e| match e {
                    HistoryEntry::Input(_, l, _) | HistoryEntry::InputOutput(_, l, _) => l,
                })
                .collect::<Vec<_>>()
        };
        assert_eq!(
            lines(json!({"hist_access_type": "tail", "n": 2})),
            vec![2, 3]
        );
        assert_eq!(
            lines(json!({"hist_access_type": "range", "start": 1, "stop": 3})),
            vec![1, 2]
        );
        assert_eq!(
            lines(json!({"hist_access_type": "search", "pattern": "? = *"})),
            vec![1, 3]
        );
    }

    #[test]
    fn only_the_most_recent_cells_are_kept() {
        let mut h = History::default();
        for line in 1..=HISTORY_LIMIT + 5 {
            h.push(line, "x", "");
        }
        let all = h.query(&json!({"hist_access_type": "tail", "n": HISTORY_LIMIT * 2}));
        assert_eq!(all.len(), HISTORY_LIMIT);
        assert!(matches!(all[0], HistoryEntry::Input(_, 6, _)));
    }
}
