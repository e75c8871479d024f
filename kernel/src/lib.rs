//! siccant-kernel: a Jupyter kernel for siccant worksheets.
//!
//! A thin adapter over the session API: [`wire`] reads and checks messages,
//! [`router`] answers shell and control requests, [`worker`] owns the session
//! on its own thread, [`iopub`] publishes outputs, [`bundle`] turns values into
//! MIME bundles, and [`kernelspec`] installs the kernel for Jupyter.
//!
//! | file | role |
//! | --- | --- |
//! | `api.rs` | the session API the kernel adapts |
//! | `connection.rs` | connection file, binding the five sockets |
//! | `wire.rs` | signature check, tolerant decoding, complaints |
//! | `router.rs` | shell and control request loops |
//! | `execution.rs` | running a cell, collecting outputs |
//! | `assistance.rs` | completion, inspection, completeness |
//! | `history.rs` | history requests |
//! | `bundle.rs` | values, checks and errors as Jupyter content |
//! | `iopub.rs` | XPUB publisher with `iopub_welcome` |
//! | `kernel.rs` | start-up, heartbeat, stdin, SIGINT |
//! | `kernelspec.rs` | `install` / `uninstall`, logo |

pub mod api;
pub mod assistance;
pub mod bundle;
pub mod connection;
pub mod execution;
pub mod history;
pub mod info;
pub mod iopub;
pub mod kernel;
pub mod kernelspec;
pub mod log;
pub mod router;
pub mod wire;
pub mod worker;
