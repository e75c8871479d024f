//! What the kernel says about itself in `kernel_info_reply`.

use jupyter_protocol::messaging::{HelpLink, KernelInfoReply, LanguageInfo, ReplyStatus};

/// Jupyter messaging protocol version spoken.
pub const PROTOCOL_VERSION: &str = "5.3";

/// The language reference URL: `SICCANT_DOCS_URL` if set, else the docs
/// folder of the source tree this kernel was built from.
pub fn docs_url() -> String {
    std::env::var("SICCANT_DOCS_URL").unwrap_or_else(|_| {
        let docs = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../docs/language.md");
        format!("file://{}", docs.display())
    })
}

/// The reply to `kernel_info_request`.
pub fn kernel_info() -> KernelInfoReply {
    let version = env!("CARGO_PKG_VERSION").to_string();
    KernelInfoReply {
        status: ReplyStatus::Ok,
        protocol_version: PROTOCOL_VERSION.to_string(),
        implementation: "siccant-kernel".to_string(),
        implementation_version: version.clone(),
        language_info: LanguageInfo {
            name: "siccant".to_string(),
            version,
            mimetype: Some("text/x-siccant".to_string()),
            file_extension: Some(".sicc".to_string()),
            pygments_lexer: Some("text".to_string()),
            codemirror_mode: None,
            nbconvert_exporter: Some("script".to_string()),
        },
        banner: format!(
            "siccant {}: unit-checked worksheets for convective dryer design",
            env!("CARGO_PKG_VERSION")
        ),
        help_links: vec![HelpLink {
            text: "siccant language reference".to_string(),
            url: docs_url(),
        }],
        debugger: false,
        error: None,
    }
}
