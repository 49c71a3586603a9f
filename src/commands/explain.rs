//! `netmargin explain [ID]`: a check's (or an input error's) documentation, or the list.

use crate::cli::ExplainArgs;

pub fn command(args: &ExplainArgs) -> std::io::Result<u8> {
    let mut out = std::io::stdout().lock();
    match &args.check {
        None => crate::report::explain::write_list(&mut out)?,
        Some(id) => {
            if !crate::report::explain::write_one(&mut out, id)? {
                let hint = crate::report::explain::hint(id);
                eprintln!(
                    "netmargin: no check or error code `{}`{hint}; `netmargin explain` lists them",
                    crate::text::sanitize(id)
                );
                return Ok(2);
            }
        }
    }
    Ok(0)
}
