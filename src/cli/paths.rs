//! Checks of the paths a command is given, made before any work: results
//! go only to `.xlsx` files that are new or regular files, and a folder or
//! an unquoted pattern given as data gets a message that says what to do.

use std::path::Path;

use super::Failure;

/// A result may be written to `out`: it ends in `.xlsx`, its folder exists,
/// and it is a new path or (with `force`) a regular file. A device node, a
/// folder or a file of another type is never replaced.
pub fn check_out(out: &Path, force: bool) -> Result<(), Failure> {
    let shown = out.display();
    let is_xlsx = out
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("xlsx"));
    if !is_xlsx {
        return Err(Failure::new(format!(
            "error: {shown}: a result is an .xlsx workbook; give --out a name ending in .xlsx"
        )));
    }
    match std::fs::metadata(out) {
        Ok(meta) if !meta.is_file() => Err(Failure::new(format!(
            "error: {shown} exists and is not a regular file (a folder, device or pipe); sheaf writes results only to regular .xlsx files"
        ))),
        Ok(_) if !force => Err(Failure::new(format!(
            "error: {shown} exists already; pass --force to replace it"
        ))),
        Ok(_) => Ok(()),
        Err(_) => {
            let folder = out.parent().filter(|p| !p.as_os_str().is_empty());
            match folder {
                Some(folder) if !folder.is_dir() => Err(Failure::new(format!(
                    "error: {shown}: the folder {} does not exist",
                    folder.display()
                ))),
                _ => Ok(()),
            }
        }
    }
}

/// The result would replace the data it is made from.
pub fn check_not_input(out: &Path, data: &Path) -> Result<(), Failure> {
    match (out.canonicalize(), data.canonicalize()) {
        (Ok(a), Ok(b)) if a == b => Err(Failure::new(format!(
            "error: {} is the input file; choose another --out",
            out.display()
        ))),
        _ => Ok(()),
    }
}

/// A batch's output folder is a folder, or a path where one can be made.
pub fn check_out_dir(dir: &Path) -> Result<(), Failure> {
    if dir.exists() && !dir.is_dir() {
        return Err(Failure::new(format!(
            "error: --out-dir {}: this is a file, not a folder",
            dir.display()
        )));
    }
    Ok(())
}

/// A single data file is a file: a folder gets a hint to give a pattern.
pub fn check_data_file(data: &Path) -> Result<(), Failure> {
    if data.is_dir() {
        let pattern = data.join("*.xlsx");
        return Err(Failure::new(format!(
            "error: {} is a folder; give one data file, or a quoted pattern and a folder for the results:\n  hint: --data '{}' --out-dir results/",
            data.display(),
            pattern.display()
        )));
    }
    Ok(())
}

/// When the shell expanded an unquoted `--data monthly/*.xlsx`, the
/// arguments after the first file are the other files: a hint to quote it.
pub fn unquoted_pattern_hint(args: &[String]) -> Option<String> {
    let at = args
        .iter()
        .position(|a| a == "--data" || a == "-d" || a.starts_with("--data="))?;
    let first = if args[at].starts_with("--data=") {
        args[at].trim_start_matches("--data=")
    } else {
        args.get(at + 1)?
    };
    let start = if args[at].starts_with("--data=") {
        at + 1
    } else {
        at + 2
    };
    let more: Vec<&String> = args[start..]
        .iter()
        .take_while(|a| !a.starts_with('-'))
        .filter(|a| Path::new(a).is_file())
        .collect();
    if more.is_empty() {
        return None;
    }
    let first = Path::new(first);
    let name = |p: &Path| {
        p.file_name()
            .map_or(String::new(), |n| n.to_string_lossy().into_owned())
    };
    // The names' common beginning, then `*` and the first name's ending.
    let mut shared = name(first);
    for other in &more {
        let other = name(Path::new(other));
        let same = shared
            .char_indices()
            .zip(other.chars())
            .take_while(|((_, a), b)| a == b)
            .last()
            .map_or(0, |((i, a), _)| i + a.len_utf8());
        shared.truncate(same);
    }
    let ending = first
        .extension()
        .map(|e| format!(".{}", e.to_string_lossy()))
        .unwrap_or_default();
    let file_pattern = format!("{shared}*{ending}");
    let pattern = match first.parent().filter(|p| !p.as_os_str().is_empty()) {
        Some(folder) => folder.join(file_pattern).display().to_string(),
        None => file_pattern,
    };
    Some(format!(
        "error: --data was given {} files: the shell expanded an unquoted pattern before sheaf saw it\n  hint: quote the pattern so that sheaf expands it: --data '{pattern}' --out-dir results/",
        more.len() + 1
    ))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn only_xlsx_endings_are_accepted() {
        let dir = tempfile::tempdir().unwrap();
        assert!(check_out(&dir.path().join("a.xlsx"), false).is_ok());
        assert!(check_out(&dir.path().join("A.XLSX"), false).is_ok());
        assert!(check_out(&dir.path().join("a.csv"), true).is_err());
        assert!(check_out(&dir.path().join("a"), true).is_err());
        assert!(check_out(&dir.path().join("no/such/a.xlsx"), true).is_err());
    }

    #[test]
    fn existing_paths_must_be_regular_files_and_forced() {
        let dir = tempfile::tempdir().unwrap();
        let file = dir.path().join("r.xlsx");
        std::fs::write(&file, b"x").unwrap();
        assert!(check_out(&file, false).is_err());
        assert!(check_out(&file, true).is_ok());
        let folder = dir.path().join("f.xlsx");
        std::fs::create_dir(&folder).unwrap();
        assert!(check_out(&folder, true).is_err());
    }
}
