//! Standard output for the commands: everything a command prints goes through [`emit`], so
//! that a closed pipe (`qorbits … | head -1`) ends the program quietly instead of a panic.

use std::io::Write;

/// Writes `text` to standard output; when the reader has gone away, exits quietly (status 0).
pub fn emit(text: &str) {
    let mut out = std::io::stdout().lock();
    let done = out.write_all(text.as_bytes()).and_then(|()| out.flush());
    if let Err(e) = done {
        if e.kind() == std::io::ErrorKind::BrokenPipe {
            std::process::exit(0);
        }
        eprintln!("qorbits: cannot write the output: {e}");
        std::process::exit(2);
    }
}

/// [`emit`] with a final newline.
pub fn line(text: &str) {
    let mut s = String::with_capacity(text.len() + 1);
    s.push_str(text);
    s.push('\n');
    emit(&s);
}
