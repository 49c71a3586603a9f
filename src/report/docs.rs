//! The checks reference (`docs/checks.md`), generated from the registry and each check's doc
//! comment. A test keeps the committed file equal to this output, so the docs never drift.

use crate::checks::REGISTRY;

pub fn checks_markdown() -> String {
    let mut s = String::from("# The checks\n\nGenerated from the check registry and each check's doc comment (`src/checks/`); `netmargin explain <id>` prints the same text. Do not edit by hand: run `NETMARGIN_UPDATE_DOCS=1 cargo test --test docs`.\n\n| id | default severity | summary |\n| --- | --- | --- |\n");
    for c in REGISTRY {
        s.push_str(&format!(
            "| [`{}`](#{}) | {} | {} |\n",
            c.id, c.id, c.severity, c.summary
        ));
    }
    for c in REGISTRY {
        s.push_str(&format!(
            "\n## {}\n\nDefault severity: {}. {}.\n",
            c.id, c.severity, c.summary
        ));
        let doc = c.doc();
        if !doc.is_empty() {
            s.push('\n');
            s.push_str(doc);
            s.push('\n');
        }
    }
    s
}
