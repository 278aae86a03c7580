//! Line numbers of the features of a GeoJSON text, so that problems can point
//! at the line where a feature starts (`serde_json::Value` keeps no positions).

/// For each element of the top-level object's `"features"` array, the 1-based
/// line where it starts. The text must already have parsed as JSON; anything
/// unexpected just gives fewer lines (callers fall back to no line).
pub(crate) fn feature_lines(text: &str) -> Vec<usize> {
    let bytes = text.as_bytes();
    let mut lines = Vec::new();
    let mut line = 1usize;
    // Stack of open containers: true for an array, false for an object.
    let mut stack: Vec<bool> = Vec::new();
    // Depth of the features array when inside it (stack length), else None.
    let mut features_depth: Option<usize> = None;
    let mut expecting_element = false;
    let mut last_key_is_features = false;
    let mut after_colon_for_features = false;
    let mut i = 0;
    while i < bytes.len() {
        let b = bytes[i];
        match b {
            b'\n' => line += 1,
            b'"' => {
                // Read the string, honouring escapes; strings never span lines in JSON.
                let start = i + 1;
                i += 1;
                while i < bytes.len() && bytes[i] != b'"' {
                    if bytes[i] == b'\\' {
                        i += 1;
                    }
                    i += 1;
                }
                let s = &bytes[start..i.min(bytes.len())];
                if features_depth == Some(stack.len()) && expecting_element {
                    lines.push(line);
                    expecting_element = false;
                }
                // A key of the top-level object?
                if stack.len() == 1 && !stack[0] {
                    let mut j = i + 1;
                    while j < bytes.len() && bytes[j].is_ascii_whitespace() {
                        j += 1;
                    }
                    if j < bytes.len() && bytes[j] == b':' {
                        last_key_is_features = s == b"features";
                    }
                }
            }
            b':' => {
                after_colon_for_features = stack.len() == 1 && last_key_is_features;
            }
            b'[' | b'{' => {
                if features_depth == Some(stack.len()) && expecting_element {
                    lines.push(line);
                    expecting_element = false;
                }
                stack.push(b == b'[');
                if b == b'[' && stack.len() == 2 && after_colon_for_features && features_depth.is_none() {
                    features_depth = Some(2);
                    expecting_element = true;
                }
                after_colon_for_features = false;
            }
            b']' | b'}' => {
                if features_depth == Some(stack.len()) {
                    // Only the first "features" array counts.
                    return lines;
                }
                stack.pop();
            }
            b',' => {
                if features_depth == Some(stack.len()) {
                    expecting_element = true;
                }
                after_colon_for_features = false;
            }
            c if c.is_ascii_whitespace() => {}
            _ => {
                // A number, true, false or null.
                if features_depth == Some(stack.len()) && expecting_element {
                    lines.push(line);
                    expecting_element = false;
                }
                after_colon_for_features = false;
            }
        }
        i += 1;
    }
    lines
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn finds_the_line_of_each_feature() {
        let t = "{\"type\": \"FeatureCollection\", \"name\": \"features\",\n \"features\": [\n  {\"type\": \"Feature\", \"properties\": {\"features\": [1, 2]}},\n\n  {\"type\": \"Feature\"}, null,\n 7]}";
        assert_eq!(feature_lines(t), vec![3, 5, 5, 6]);
    }

    #[test]
    fn nested_features_keys_are_ignored() {
        let t = "{\"a\": {\"features\": [1]},\n\"features\": [\n{}]}";
        assert_eq!(feature_lines(t), vec![3]);
    }

    #[test]
    fn escaped_quotes_do_not_confuse_it() {
        let t = "{\"x\": \"a\\\"]}\", \"features\": [\n{\"p\": \"\\\\\"},\n{}]}";
        assert_eq!(feature_lines(t), vec![2, 3]);
    }
}
