//! `tourwright completions SHELL` and `tourwright manual [--out DIR]`: shell completion scripts
//! and manual pages, generated from the one argument schema (clap_complete, clap_mangen).

use std::path::PathBuf;

use super::{CliResult, is_dash, out};

/// The arguments of `completions`.
#[derive(clap::Args, Debug)]
pub struct CompletionArgs {
    /// The shell.
    #[arg(value_enum)]
    pub shell: clap_complete::Shell,
}

/// The arguments of `manual`.
#[derive(clap::Args, Debug)]
pub struct ManualArgs {
    /// A folder for tourwright.1 and one page per command (tourwright-eval.1, ...); - prints
    /// the main page.
    #[arg(long, default_value = "-")]
    pub out: PathBuf,
}

/// Print a completion script.
pub fn completions(a: CompletionArgs) -> CliResult {
    let mut cmd = super::command();
    clap_complete::generate(a.shell, &mut cmd, "tourwright", &mut std::io::stdout());
    Ok(())
}

/// Write the manual pages.
pub fn manual(a: ManualArgs) -> CliResult {
    let cmd = super::command();
    if is_dash(&a.out) {
        let mut buf = Vec::new();
        clap_mangen::Man::new(cmd)
            .render(&mut buf)
            .map_err(|e| e.to_string())?;
        return super::write(&a.out, &String::from_utf8_lossy(&buf));
    }
    std::fs::create_dir_all(&a.out).map_err(|e| format!("{}: {e}", a.out.display()))?;
    clap_mangen::generate_to(cmd, &a.out).map_err(|e| format!("{}: {e}", a.out.display()))?;
    out(&format!("manual pages written to {}", a.out.display()));
    Ok(())
}
