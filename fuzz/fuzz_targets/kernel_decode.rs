//! Fuzz the kernel's message decoding: arbitrary JSON frames (split on a
//! 0xff byte) decode to a request, a malformed request or a dropped message,
//! never a panic.
#![no_main]

use bytes::Bytes;
use jupyter_zmq_client::RawMessage;
use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let jparts: Vec<Bytes> = data
        .split(|b| *b == 0xff)
        .take(8)
        .map(|part| Bytes::copy_from_slice(part))
        .collect();
    let raw = RawMessage {
        zmq_identities: Vec::new(),
        jparts,
    };
    let _ = siccant_kernel::wire::decode(raw, "shell");
});
