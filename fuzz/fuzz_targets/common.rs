//! What the fuzz targets share: the first byte of an input picks a mode, the rest is text.

/// The mode byte and the UTF-8 text after it; `None` for an empty input or text that is not
/// UTF-8 (the command line reads only UTF-8).
pub fn mode_and_text(data: &[u8]) -> Option<(u8, &str)> {
    let (&mode, rest) = data.split_first()?;
    Some((mode, std::str::from_utf8(rest).ok()?))
}
