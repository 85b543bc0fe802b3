//! Crate level documentation for the store.

/// Returns the length of the record.
fn len<'a>(x: &'a str) -> usize {
    let s = r#"raw "quoted" // not"#; // after the raw string
    let c = '"'; /* outer /* nested */ still outer */
    x.len()
}
