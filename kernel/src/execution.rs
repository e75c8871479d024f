//! Running one cell on the evaluation thread and collecting what iopub shows.

use std::sync::atomic::{AtomicBool, Ordering};

use jupyter_protocol::messaging::{
    DisplayData, ErrorOutput, ExecuteResult, JupyterMessageContent, StreamContent, Transient,
};
use jupyter_protocol::{ExecutionCount, Media, MediaType};

use crate::api::{Output, OutputItem};
use crate::bundle;
use crate::worker::Worksheet;

/// A cell to run.
pub struct Cell {
    pub code: String,
    /// Show nothing and store no history.
    pub silent: bool,
    /// Record the cell in history under `count`.
    pub store_history: bool,
    /// The execution count of this cell.
    pub count: usize,
}

/// What a cell produced, ready for iopub, and its error if it failed.
pub struct Executed {
    pub outputs: Vec<JupyterMessageContent>,
    pub error: Option<ErrorOutput>,
}

/// Evaluate `cell` in the worksheet. The router clears the interrupt flag
/// before it announces the cell, so an interrupt that arrived while idle does
/// not stop it and one sent after `execute_input` is never lost.
pub fn execute(sheet: &mut Worksheet, cell: &Cell, interrupt: &AtomicBool) -> Executed {
    let result = sheet.session.eval(&cell.code);
    let interrupted = interrupt.swap(false, Ordering::SeqCst);
    let executed = match result {
        Ok(output) => shown(sheet, &output, cell.count),
        Err(diagnostics) => Executed {
            outputs: Vec::new(),
            error: Some(bundle::error_output(
                &sheet.session,
                &diagnostics,
                interrupted,
            )),
        },
    };
    if cell.store_history && !cell.silent {
        sheet
            .history
            .push(cell.count, &cell.code, &plain_result(&executed.outputs));
    }
    if cell.silent {
        return Executed {
            outputs: Vec::new(),
            error: executed.error,
        };
    }
    executed
}

/// Warnings as a stderr stream, then each item: the last value as the
/// execute_result, everything else as display_data.
fn shown(sheet: &Worksheet, output: &Output, count: usize) -> Executed {
    let mut outputs = Vec::new();
    let mut problems = Vec::new();
    if !output.warnings.is_empty() {
        let text = bundle::warning_text(&sheet.session, &output.warnings);
        outputs.push(StreamContent::stderr(&text).into());
    }
    let last_value = output
        .items
        .iter()
        .rposition(|i| matches!(i, OutputItem::Value { .. }));
    for (index, item) in output.items.iter().enumerate() {
        let (data, mut trouble) = bundle::item_bundle(item);
        problems.append(&mut trouble);
        outputs.push(if Some(index) == last_value {
            ExecuteResult {
                transient: Some(Transient::default()),
                ..ExecuteResult::new(ExecutionCount::new(count), data)
            }
            .into()
        } else {
            DisplayData::new(data).into()
        });
    }
    if !problems.is_empty() {
        outputs.push(StreamContent::stderr(&(problems.join("\n") + "\n")).into());
    }
    Executed {
        outputs,
        error: None,
    }
}

/// The text/plain of the execute_result, for history with output.
fn plain_result(outputs: &[JupyterMessageContent]) -> String {
    outputs
        .iter()
        .find_map(|o| match o {
            JupyterMessageContent::ExecuteResult(r) => plain(&r.data),
            _ => None,
        })
        .unwrap_or_default()
}

fn plain(media: &Media) -> Option<String> {
    media.content.iter().find_map(|m| match m {
        MediaType::Plain(t) => Some(t.clone()),
        _ => None,
    })
}
