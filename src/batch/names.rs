//! District names to folder names that cannot escape the output folder.

/// A folder name for a district: letters, digits, `-` and `_` kept; spaces become `-`; anything else
/// (slashes, dots, colons, control characters) becomes `_`. A name that would be empty gets `_`.
pub fn folder_name(name: &str) -> String {
    let mut s: String = name
        .trim()
        .chars()
        .map(|c| {
            if c.is_alphanumeric() || c == '-' || c == '_' {
                c
            } else if c == ' ' {
                '-'
            } else {
                '_'
            }
        })
        .collect();
    if s.is_empty() {
        s.push('_');
    }
    // Keep names short enough for every file system (255 bytes), on a character boundary.
    while s.len() > 120 {
        s.pop();
    }
    s
}

#[cfg(test)]
mod tests {
    use super::folder_name;

    #[test]
    fn hostile_names_stay_inside() {
        assert_eq!(folder_name("Low Fennick"), "Low-Fennick");
        assert_eq!(folder_name("../outside"), "___outside");
        assert_eq!(folder_name("/etc/passwd"), "_etc_passwd");
        assert_eq!(folder_name(".."), "__");
        assert_eq!(folder_name(""), "_");
        assert_eq!(folder_name("C:\\temp"), "C__temp");
        for n in ["..", ".", "a/../b", "\u{0}x"] {
            let f = folder_name(n);
            assert!(
                !f.contains('/') && !f.contains('\\') && !f.starts_with('.'),
                "{n} → {f}"
            );
        }
    }
}
