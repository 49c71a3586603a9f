//! `netmargin config --show [PATH]`: the settings a netlist is analysed with, resolved by
//! [`crate::analysis`] as every other command resolves them.

use std::io::Write;

use crate::analysis::{config_for, Overrides, Settings};
use crate::cli::{ColorChoice, ConfigArgs};
use crate::input::ReadOptions;

pub fn command(args: &ConfigArgs, read: &ReadOptions, color: ColorChoice) -> std::io::Result<u8> {
    if !super::known_checks(&args.settings) {
        return Ok(2);
    }
    let target = args.path.clone().unwrap_or_else(|| ".".to_string());
    if target != "-" && !std::path::Path::new(&target).exists() {
        eprintln!("netmargin: no file or folder `{target}`");
        return Ok(2);
    }
    let over = Overrides::from(&args.settings);
    let settings = match Settings::resolve(&target, &over, read) {
        Ok(s) => s,
        Err(errors) => {
            let shown: Vec<_> = errors.iter().map(super::error_outcome).collect();
            super::to_stderr(&shown, color)?;
            return Ok(2);
        }
    };
    let mut text = crate::report::settings::show(&target, settings.config.as_ref(), &over);
    // in a folder, netlists below a netmargin.toml of their own use that one
    if std::path::Path::new(&target).is_dir() {
        let mut others: std::collections::BTreeMap<String, usize> = Default::default();
        for f in super::check::expand_paths(std::slice::from_ref(&target)) {
            let c = config_for(&f, &over);
            if c != settings.config_path {
                *others
                    .entry(c.map_or_else(
                        || "no configuration".to_string(),
                        |p| p.display().to_string(),
                    ))
                    .or_default() += 1;
            }
        }
        for (c, n) in others {
            text.push_str(&format!(
                "\n# note: {n} netlist{} below use {}\n",
                if n == 1 { "" } else { "s" },
                crate::text::sanitize(&c)
            ));
        }
    }
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())?;
    out.flush()?;
    Ok(0)
}
