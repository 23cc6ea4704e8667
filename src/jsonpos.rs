//! Find where a JSON path (`stages[2].load.coil_ohms`) stands in a JSON text, so that errors
//! found after parsing can name a line and column as well as the path.

/// One step of a path.
#[derive(Debug, PartialEq)]
enum Step {
    Key(String),
    Index(usize),
}

fn steps(path: &str) -> Option<Vec<Step>> {
    let mut out = Vec::new();
    for part in path.split('.') {
        let (key, mut rest) = match part.find('[') {
            Some(i) => (part.get(..i)?, part.get(i..)?),
            None => (part, ""),
        };
        if !key.is_empty() {
            out.push(Step::Key(key.to_string()));
        }
        while let Some(stripped) = rest.strip_prefix('[') {
            let (index, after) = stripped.split_once(']')?;
            out.push(Step::Index(index.parse().ok()?));
            rest = after;
        }
    }
    Some(out)
}

/// The 1-based (line, column) where the value at `path` starts, if the text holds it.
pub fn locate(text: &str, path: &str) -> Option<(usize, usize)> {
    let pos = value_start(text, path)?;
    Some(line_column(text, pos))
}

/// As [`locate`], with the value as typed when it is a scalar (a number, `true`, `null`, or a
/// short string): errors quote what the user wrote, not what the parser made of it.
pub fn locate_token(text: &str, path: &str) -> Option<crate::error::Located> {
    let pos = value_start(text, path)?;
    let (line, column) = line_column(text, pos);
    let bytes = text.as_bytes();
    let token = match bytes.get(pos) {
        Some(b'{') | Some(b'[') | None => None,
        Some(_) => skip_value(bytes, pos)
            .and_then(|end| text.get(pos..end))
            .filter(|t| t.chars().count() <= 40)
            .map(str::to_string),
    };
    Some(crate::error::Located {
        line,
        column,
        token,
    })
}

/// 1-based line and column of a byte position.
fn line_column(text: &str, pos: usize) -> (usize, usize) {
    let before = text.get(..pos.min(text.len())).unwrap_or(text);
    let line = before.matches('\n').count() + 1;
    let column = before.rsplit('\n').next().map_or(0, |l| l.chars().count()) + 1;
    (line, column)
}

/// Byte position where the value at `path` starts (the whole text for an empty path).
fn value_start(text: &str, path: &str) -> Option<usize> {
    let steps = steps(path)?;
    let bytes = text.as_bytes();
    let mut pos = 0;
    for step in &steps {
        pos = skip_ws(bytes, pos);
        match (step, bytes.get(pos)?) {
            (Step::Key(k), b'{') => pos = find_member(bytes, pos, k)?,
            (Step::Index(n), b'[') => pos = find_element(bytes, pos, *n)?,
            _ => return None,
        }
    }
    Some(skip_ws(bytes, pos))
}

fn skip_ws(b: &[u8], mut pos: usize) -> usize {
    while b.get(pos).is_some_and(u8::is_ascii_whitespace) {
        pos += 1;
    }
    pos
}

/// Position just after a string that starts at `pos` (on its opening quote).
fn skip_string(b: &[u8], mut pos: usize) -> Option<usize> {
    pos += 1;
    while let Some(c) = b.get(pos) {
        match c {
            b'\\' => pos += 2,
            b'"' => return Some(pos + 1),
            _ => pos += 1,
        }
    }
    None
}

/// Position just after the value that starts at `pos`.
fn skip_value(b: &[u8], pos: usize) -> Option<usize> {
    let pos = skip_ws(b, pos);
    match b.get(pos)? {
        b'"' => skip_string(b, pos),
        b'{' | b'[' => {
            let mut depth = 0usize;
            let mut p = pos;
            while let Some(c) = b.get(p) {
                match c {
                    b'"' => {
                        p = skip_string(b, p)?;
                        continue;
                    }
                    b'{' | b'[' => depth += 1,
                    b'}' | b']' => {
                        depth = depth.saturating_sub(1);
                        if depth == 0 {
                            return Some(p + 1);
                        }
                    }
                    _ => {}
                }
                p += 1;
            }
            None
        }
        _ => {
            let mut p = pos;
            while b
                .get(p)
                .is_some_and(|c| !matches!(c, b',' | b'}' | b']') && !c.is_ascii_whitespace())
            {
                p += 1;
            }
            Some(p)
        }
    }
}

/// Inside the object at `pos`, the position of the value of member `key`.
fn find_member(b: &[u8], pos: usize, key: &str) -> Option<usize> {
    let mut p = pos + 1;
    loop {
        p = skip_ws(b, p);
        match b.get(p)? {
            b'}' => return None,
            b',' => {
                p += 1;
                continue;
            }
            b'"' => {
                let end = skip_string(b, p)?;
                let name = std::str::from_utf8(b.get(p + 1..end - 1)?).ok()?;
                p = skip_ws(b, end);
                if b.get(p) != Some(&b':') {
                    return None;
                }
                p += 1;
                if name == key {
                    return Some(skip_ws(b, p));
                }
                p = skip_value(b, p)?;
            }
            _ => return None,
        }
    }
}

/// Inside the array at `pos`, the position of element `n`.
fn find_element(b: &[u8], pos: usize, n: usize) -> Option<usize> {
    let mut p = pos + 1;
    let mut i = 0;
    loop {
        p = skip_ws(b, p);
        match b.get(p)? {
            b']' => return None,
            b',' => {
                p += 1;
                continue;
            }
            _ => {
                if i == n {
                    return Some(p);
                }
                p = skip_value(b, p)?;
                i += 1;
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const TEXT: &str = "{\n  \"defaults\": {\"supply_v\": 12},\n  \"stages\": [\n    {\"name\": \"a,]}\", \"load\": {\"kind\": \"led\"}},\n    {\"name\": \"b\", \"load\": {\"current_a\": -1}}\n  ]\n}";

    #[test]
    fn finds_nested_members_and_elements() {
        assert_eq!(locate(TEXT, "defaults.supply_v"), Some((2, 28)));
        assert_eq!(locate(TEXT, "stages[1].load.current_a"), Some((5, 41)));
        assert_eq!(locate(TEXT, "stages[0].load"), Some((4, 30)));
    }

    #[test]
    fn tokens_come_as_typed() {
        let t = locate_token("{\"a\": [1e-400, {\"b\": true}]}", "a[0]").expect("found");
        assert_eq!(
            (t.line, t.column, t.token.as_deref()),
            (1, 8, Some("1e-400"))
        );
        let t = locate_token("{\"a\": {\"b\": 1}}", "a").expect("found");
        assert_eq!(t.token, None);
    }

    #[test]
    fn missing_paths_give_none() {
        assert_eq!(locate(TEXT, "stages[2]"), None);
        assert_eq!(locate(TEXT, "defaults.nope"), None);
        assert_eq!(locate("not json", "a"), None);
        assert_eq!(locate("{\"a\": [1, 2", "a[5]"), None);
    }
}
