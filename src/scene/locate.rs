//! Where each item of a scene is written in the scene text.
//!
//! Serde forgets where a value came from, so to say which item a message is about (or which
//! item a RON error falls in) the loader needs its own map from text positions to items.
//! This is a small scanner, not a RON parser: it only needs brackets, strings, comments,
//! field names and commas. It must keep going on text that RON rejects, because a broken
//! file is exactly when it is asked, so it never fails: it returns what it found.
//!
//! Positions are counted the way RON counts them in its errors, so that an error position
//! can be looked up directly: lines and columns count from 1, columns count characters (not
//! bytes), and only `\n` ends a line (the `\r` of a CRLF is the last column of its line).
//! The text is the text after the byte-order mark was removed: the loader strips it before
//! RON sees the text, so RON's columns on the first line do not count it.

/// A line and a column, both from 1; ordered as positions in the text are.
type Pos = (usize, usize);

/// How deep `items` lists are followed. RON's own recursion limit rejects far shallower
/// scenes; the bound only keeps hostile text from overflowing the stack.
const MAX_NESTING: usize = 100;

/// One item as written: where it starts and ends (line and column count from 1, columns in
/// characters), its kind (the identifier before the parenthesis, e.g. "Block"), its
/// `label: "..."` if it has one at its own level (not a child's), and the items nested in its
/// own `items: [...]` list (groups and repeats).
///
/// `start` is the first character of the item (the first letter of its kind). `end` is just
/// past its last character (its closing parenthesis); for an item the text ends inside, it is
/// the end of the text. An item without a kind (a bare `(...)`) has an empty `kind`.
#[derive(Clone, Debug, PartialEq)]
pub(crate) struct ItemSpan {
    pub start: (usize, usize),
    pub end: (usize, usize),
    pub kind: String,
    pub label: Option<String>,
    pub children: Vec<ItemSpan>,
}

/// The items of the top-level `items: [...]` list of the `Scene(...)`, in order. Never panics
/// on any input (truncated, unbalanced, binary-ish text): it returns what it could find.
///
/// `text` is the scene text after the byte-order mark, if any, was removed (as the loader
/// does before parsing), so that positions match RON's.
pub(crate) fn item_spans(text: &str) -> Vec<ItemSpan> {
    let scan = Scan::new(text);
    let Some(group) = scan.scene_group() else {
        return Vec::new();
    };
    scan.fields(group)
        .into_iter()
        .find(|&(name, value)| name == "items" && scan.is(value, Tok::Open('[')))
        .map(|(_, list)| scan.list(list, 1))
        .unwrap_or_default()
}

/// Where the value of a scene-level field is written, following the fields of nested
/// structs: `["sun", "time"]` is the value of `time` in the scene's `sun: (...)` block.
/// `None` if the text has no such field.
pub(crate) fn field_value_at(text: &str, path: &[&str]) -> Option<(usize, usize)> {
    let scan = Scan::new(text);
    let mut value = scan.scene_group()?;
    for (depth, name) in path.iter().enumerate() {
        // A nested struct may be written with its name, `Sun(...)`, or without, `(...)`.
        let open = match (depth, scan.toks.get(value).map(|t| t.tok)) {
            (0, _) => value,
            (_, Some(Tok::Ident)) if scan.is(value + 1, Tok::Open('(')) => value + 1,
            (_, Some(Tok::Open('('))) => value,
            _ => return None,
        };
        value = scan
            .fields(open)
            .into_iter()
            .find(|&(field, _)| field == *name)?
            .1;
    }
    scan.toks.get(value).map(|t| t.start)
}

impl Scan {
    /// The opening parenthesis of the `Scene(...)`, after any `#![enable(...)]`.
    fn scene_group(&self) -> Option<usize> {
        let toks = &self.toks;
        let mut i = 0;
        // `#![enable(...)]` attributes may come before the scene.
        while toks.get(i).is_some_and(|t| t.tok == Tok::Other('#')) {
            i += 1;
            if toks.get(i).is_some_and(|t| t.tok == Tok::Other('!')) {
                i += 1;
            }
            if toks.get(i).is_some_and(|t| t.tok == Tok::Open('[')) {
                i = self.after(i);
            }
        }
        // RON lets the struct name be left out: `(items: [...])` is a scene too.
        match toks.get(i).map(|t| &t.tok) {
            Some(Tok::Ident) if self.is(i + 1, Tok::Open('(')) => Some(i + 1),
            Some(Tok::Open('(')) => Some(i),
            _ => None,
        }
    }
}

/// The path of indices (from 0) to the innermost item whose span contains the position
/// (line, column); e.g. `[1, 0]` for the first item of the second top-level item. Empty if
/// the position is in no item. A position just past a truncated item (end of file inside an
/// unclosed item) counts as inside it.
///
/// Both ends count as inside, so that the end of the text, where RON reports that the text
/// ended too soon, falls in the truncated item. (RON reports a missing field at the item's
/// closing parenthesis, which is inside either way.)
pub(crate) fn item_path_at(spans: &[ItemSpan], line: usize, column: usize) -> Vec<usize> {
    let pos = (line, column);
    let mut path = Vec::new();
    let mut level = spans;
    while let Some(i) = level.iter().position(|s| s.start <= pos && pos <= s.end) {
        path.push(i);
        level = &level[i].children;
    }
    path
}

/// How a message names the item at `path`: `Block "corn hall" (item 1)`, and for nested
/// items `Column "c1" (item 1 of item 2)`; counting from 1; without a label:
/// `Point (item 2 of item 2)`. `None` if the path is empty or leads nowhere.
pub(crate) fn describe_path(spans: &[ItemSpan], path: &[usize]) -> Option<String> {
    let mut level = spans;
    let mut item = None;
    for &i in path {
        let span = level.get(i)?;
        level = &span.children;
        item = Some(span);
    }
    let item = item?;
    let mut text = if item.kind.is_empty() {
        "Item".to_owned()
    } else {
        item.kind.clone()
    };
    if let Some(label) = &item.label {
        // Debug quoting keeps a label with quotes or line breaks on one readable line.
        text.push_str(&format!(" {label:?}"));
    }
    let places: Vec<String> = path
        .iter()
        .rev()
        .map(|i| format!("item {}", i + 1))
        .collect();
    text.push_str(&format!(" ({})", places.join(" of ")));
    Some(text)
}

/// What the scanner tells apart; everything else is `Other`.
#[derive(Clone, Copy, Debug, PartialEq)]
enum Tok {
    Open(char),
    /// Any closing bracket: a mismatched one still closes the innermost open bracket, which
    /// keeps the rest of the file in step when someone typed `]` for `)`.
    Close,
    Comma,
    Colon,
    /// A name; its text (without a raw identifier's `r#`) is in `Token::text`.
    Ident,
    /// A string; its decoded value is in `Token::text`.
    Str,
    /// A number, a char literal or a punctuation character (the first character).
    Other(char),
}

#[derive(Debug)]
struct Token {
    tok: Tok,
    start: Pos,
    end: Pos,
    text: String,
}

/// The tokens of a text, with the index of each opening bracket's partner.
struct Scan {
    toks: Vec<Token>,
    /// For an opening bracket, the index of the bracket closing it, or `toks.len()` if the
    /// text ends first. Other entries are unused.
    close: Vec<usize>,
    /// Just past the last character.
    eof: Pos,
}

impl Scan {
    fn new(text: &str) -> Scan {
        let (toks, eof) = tokens(text);
        let mut close = vec![toks.len(); toks.len()];
        let mut open = Vec::new();
        for (i, t) in toks.iter().enumerate() {
            match t.tok {
                Tok::Open(_) => open.push(i),
                // A stray closing bracket at the outermost level closes nothing.
                Tok::Close => {
                    if let Some(o) = open.pop() {
                        close[o] = i;
                    }
                }
                _ => {}
            }
        }
        Scan { toks, close, eof }
    }

    fn is(&self, i: usize, tok: Tok) -> bool {
        self.toks.get(i).is_some_and(|t| t.tok == tok)
    }

    /// The index after token `i`, skipping the whole bracketed group if `i` opens one.
    fn after(&self, i: usize) -> usize {
        match self.toks.get(i).map(|t| t.tok) {
            Some(Tok::Open(_)) => (self.close[i] + 1).min(self.toks.len()),
            _ => i + 1,
        }
    }

    /// The entries of the group opened at `open`, at its own level: for each, the index of
    /// its first token and the index after its last. Entries are split at commas; empty ones
    /// (after a trailing comma) are left out. The flag says the text ends inside the entry.
    fn entries(&self, open: usize) -> Vec<(usize, usize, bool)> {
        let end = self.close[open];
        let mut out = Vec::new();
        let mut i = open + 1;
        while i < end {
            let first = i;
            let mut truncated = false;
            while i < end && self.toks[i].tok != Tok::Comma {
                truncated |=
                    matches!(self.toks[i].tok, Tok::Open(_)) && self.close[i] == self.toks.len();
                i = self.after(i);
            }
            if i > first {
                out.push((first, i, truncated));
            }
            i += 1;
        }
        out
    }

    /// The `name: value` fields of the struct opened at `open`, at its own level: each name
    /// with the index of the value's first token. A child's fields are inside a nested
    /// group and so are never seen here.
    fn fields(&self, open: usize) -> Vec<(&str, usize)> {
        self.entries(open)
            .into_iter()
            .filter(|&(first, stop, _)| {
                first + 2 < stop
                    && self.toks[first].tok == Tok::Ident
                    && self.toks[first + 1].tok == Tok::Colon
            })
            .map(|(first, _, _)| (self.toks[first].text.as_str(), first + 2))
            .collect()
    }

    /// The items of the list opened at `open`.
    fn list(&self, open: usize, depth: usize) -> Vec<ItemSpan> {
        self.entries(open)
            .into_iter()
            .map(|(first, stop, truncated)| self.item(first, stop, truncated, depth))
            .collect()
    }

    /// The item written in tokens `first..stop`.
    fn item(&self, first: usize, stop: usize, truncated: bool, depth: usize) -> ItemSpan {
        let head = &self.toks[first];
        let (kind, group) = match head.tok {
            Tok::Ident if self.is(first + 1, Tok::Open('(')) => {
                (head.text.clone(), Some(first + 1))
            }
            Tok::Ident => (head.text.clone(), None),
            Tok::Open('(') => (String::new(), Some(first)),
            _ => (String::new(), None),
        };
        let mut label = None;
        let mut children = Vec::new();
        for (name, value) in group.map(|g| self.fields(g)).unwrap_or_default() {
            match name {
                "label" if label.is_none() => label = self.string_at(value),
                "items" if self.is(value, Tok::Open('[')) && depth < MAX_NESTING => {
                    children = self.list(value, depth + 1);
                }
                _ => {}
            }
        }
        ItemSpan {
            start: head.start,
            end: if truncated {
                self.eof
            } else {
                self.toks[stop - 1].end
            },
            kind,
            label,
            children,
        }
    }

    /// The string at token `i`, written plainly or as `Some("...")`.
    fn string_at(&self, i: usize) -> Option<String> {
        let i = if self.toks[i].tok == Tok::Ident
            && self.toks[i].text == "Some"
            && self.is(i + 1, Tok::Open('('))
        {
            i + 2
        } else {
            i
        };
        let t = self.toks.get(i)?;
        (t.tok == Tok::Str).then(|| t.text.clone())
    }
}

/// Reads characters and keeps count of the line and column.
struct Cursor {
    chars: Vec<char>,
    i: usize,
    pos: Pos,
}

impl Cursor {
    fn peek(&self, ahead: usize) -> Option<char> {
        self.chars.get(self.i + ahead).copied()
    }

    fn bump(&mut self) -> Option<char> {
        let c = self.peek(0)?;
        self.i += 1;
        self.pos = if c == '\n' {
            (self.pos.0 + 1, 1)
        } else {
            (self.pos.0, self.pos.1 + 1)
        };
        Some(c)
    }

    fn bump_while(&mut self, keep: impl Fn(char) -> bool) {
        while self.peek(0).is_some_and(&keep) {
            self.bump();
        }
    }

    /// Skips a block comment from its `/*`. RON's block comments nest.
    fn block_comment(&mut self) {
        let mut level = 0;
        while let Some(c) = self.peek(0) {
            if c == '/' && self.peek(1) == Some('*') {
                level += 1;
                self.bump();
            } else if c == '*' && self.peek(1) == Some('/') {
                level -= 1;
                self.bump();
            }
            self.bump();
            if level == 0 {
                return;
            }
        }
    }

    /// Reads a quoted string after its opening `"` and decodes its escapes. Decoding goes
    /// through bytes because RON lets `\x` escapes spell out a UTF-8 character byte by byte.
    fn string(&mut self) -> String {
        let mut bytes = Vec::new();
        while let Some(c) = self.bump() {
            match c {
                '"' => break,
                '\\' => self.escape(&mut bytes),
                c => bytes.extend_from_slice(c.encode_utf8(&mut [0; 4]).as_bytes()),
            }
        }
        String::from_utf8_lossy(&bytes).into_owned()
    }

    /// Decodes one escape after its `\`. A broken escape is kept as far as it goes: RON
    /// reports it, the scanner only has to get past it.
    fn escape(&mut self, bytes: &mut Vec<u8>) {
        let Some(c) = self.bump() else { return };
        let plain = match c {
            'n' => '\n',
            'r' => '\r',
            't' => '\t',
            '0' => '\0',
            'x' => {
                let hex = self.hex_digits(2);
                if let Ok(b) = u8::try_from(hex) {
                    bytes.push(b);
                }
                return;
            }
            'u' => {
                if self.peek(0) == Some('{') {
                    self.bump();
                    let hex = self.hex_digits(6);
                    if self.peek(0) == Some('}') {
                        self.bump();
                    }
                    if let Some(c) = char::from_u32(hex) {
                        bytes.extend_from_slice(c.encode_utf8(&mut [0; 4]).as_bytes());
                    }
                }
                return;
            }
            // A backslash before a line break continues the string on the next line,
            // leaving out the line break and the indent.
            '\n' | '\r' => {
                self.bump_while(|c| matches!(c, ' ' | '\t' | '\n' | '\r'));
                return;
            }
            other => other,
        };
        bytes.extend_from_slice(plain.encode_utf8(&mut [0; 4]).as_bytes());
    }

    fn hex_digits(&mut self, at_most: usize) -> u32 {
        let mut value = 0;
        for _ in 0..at_most {
            match self.peek(0).and_then(|c| c.to_digit(16)) {
                Some(d) => {
                    value = value * 16 + d;
                    self.bump();
                }
                None => break,
            }
        }
        value
    }

    /// If a raw string (`r"`, `r#"`, `br##"`...) starts here, the number of characters
    /// before its opening quote and the number of `#`s that will close it.
    fn raw_string_start(&self) -> Option<(usize, usize)> {
        let prefix = match (self.peek(0), self.peek(1)) {
            (Some('r'), _) => 1,
            (Some('b'), Some('r')) => 2,
            _ => return None,
        };
        let mut hashes = 0;
        while self.peek(prefix + hashes) == Some('#') {
            hashes += 1;
        }
        (self.peek(prefix + hashes) == Some('"')).then_some((prefix + hashes, hashes))
    }

    /// Reads a raw string after its opening `"`: it ends at a `"` followed by as many `#`s
    /// as it began with, and has no escapes.
    fn raw_string(&mut self, hashes: usize) -> String {
        let mut text = String::new();
        while let Some(c) = self.bump() {
            if c == '"' && (0..hashes).all(|k| self.peek(k) == Some('#')) {
                for _ in 0..hashes {
                    self.bump();
                }
                break;
            }
            text.push(c);
        }
        text
    }

    /// Skips a char literal from its `'`, so that `'('` or `'"'` cannot be taken for a
    /// bracket or a string. If no closing `'` follows close by, only the `'` is skipped.
    fn char_literal(&mut self) {
        self.bump();
        match self.peek(0) {
            Some('\\') => {
                self.bump();
                if self.peek(0).is_some_and(|c| c != '\n') {
                    self.bump();
                }
            }
            Some(c) if c != '\n' && c != '\'' => {
                self.bump();
            }
            _ => {}
        }
        // What is left of a longer escape, `\u{1F600}` or `\x41`, up to the closing quote.
        let near = (0..10)
            .take_while(|&k| self.peek(k).is_some_and(|c| c != '\n' && c != '\''))
            .count();
        if self.peek(near) == Some('\'') {
            for _ in 0..=near {
                self.bump();
            }
        }
    }
}

fn is_ident_start(c: char) -> bool {
    c == '_' || c.is_alphabetic()
}

fn is_ident_char(c: char) -> bool {
    c == '_' || c.is_alphanumeric()
}

/// The tokens of `text`, without whitespace and comments, and the position just past its end.
fn tokens(text: &str) -> (Vec<Token>, Pos) {
    let mut cur = Cursor {
        chars: text.chars().collect(),
        i: 0,
        pos: (1, 1),
    };
    let mut toks = Vec::new();
    while let Some(c) = cur.peek(0) {
        let start = cur.pos;
        let mut text = String::new();
        let tok = if c.is_whitespace() {
            cur.bump();
            continue;
        } else if c == '/' && cur.peek(1) == Some('/') {
            cur.bump_while(|c| c != '\n');
            continue;
        } else if c == '/' && cur.peek(1) == Some('*') {
            cur.block_comment();
            continue;
        } else if c == '"' || (c == 'b' && cur.peek(1) == Some('"')) {
            // `b"..."` is a byte string: the same escapes, as far as the scanner cares.
            if c == 'b' {
                cur.bump();
            }
            cur.bump();
            text = cur.string();
            Tok::Str
        } else if let Some((before_quote, hashes)) = cur.raw_string_start() {
            for _ in 0..=before_quote {
                cur.bump();
            }
            text = cur.raw_string(hashes);
            Tok::Str
        } else if c == '\'' {
            cur.char_literal();
            Tok::Other('\'')
        } else if c == 'r' && cur.peek(1) == Some('#') && cur.peek(2).is_some_and(is_ident_char) {
            // A raw identifier, `r#name`; RON also allows `.`, `+` and `-` in it.
            cur.bump();
            cur.bump();
            let first = cur.i;
            cur.bump_while(|c| is_ident_char(c) || matches!(c, '.' | '+' | '-'));
            text = cur.chars[first..cur.i].iter().collect();
            Tok::Ident
        } else if is_ident_start(c) {
            let first = cur.i;
            cur.bump_while(is_ident_char);
            text = cur.chars[first..cur.i].iter().collect();
            Tok::Ident
        } else if c.is_ascii_digit() {
            // A number, with its exponent, fraction, suffix or underscores; one token, so
            // that `1e5` has no name `e5` in it.
            cur.bump_while(|c| is_ident_char(c) || c == '.');
            Tok::Other(c)
        } else {
            cur.bump();
            match c {
                '(' | '[' | '{' => Tok::Open(c),
                ')' | ']' | '}' => Tok::Close,
                ',' => Tok::Comma,
                ':' => Tok::Colon,
                other => Tok::Other(other),
            }
        };
        toks.push(Token {
            tok,
            start,
            end: cur.pos,
            text,
        });
    }
    (toks, cur.pos)
}

#[cfg(test)]
mod tests {
    use super::*;

    const SQUARE: &str = r#"Scene(
    name: "Tollgate Square",
    standpoints: [(name: "fountain", x: 0, y: -6)],
    items: [
        Block(label: "corn hall", at: Corner(0, 10), width: 24, depth: 12, height: 9.5),
        Group(at: (5, 0, 0), turn: 30, items: [
            Column(label: "c1", at: (0, 0), diameter: 0.5, height: 4),
            Point(at: (1, 2, 0)),
        ]),
        Polyline(points: [(-30, -3, 0), (30, -3, 0)]),
    ],
)
"#;

    /// Kinds and labels as a compact outline, children in brackets.
    fn outline(spans: &[ItemSpan]) -> String {
        spans
            .iter()
            .map(|s| {
                let mut text = s.kind.clone();
                if let Some(label) = &s.label {
                    text.push_str(&format!("{label:?}"));
                }
                if !s.children.is_empty() {
                    text.push_str(&format!("[{}]", outline(&s.children)));
                }
                text
            })
            .collect::<Vec<_>>()
            .join(" ")
    }

    #[test]
    fn the_example_scene() {
        let spans = item_spans(SQUARE);
        assert_eq!(
            outline(&spans),
            r#"Block"corn hall" Group[Column"c1" Point] Polyline"#
        );
        assert_eq!(spans[0].start, (5, 9));
        assert_eq!(spans[0].end, (5, 88));
        assert_eq!(spans[1].start, (6, 9));
        assert_eq!(spans[1].end, (9, 11));
        assert_eq!(spans[1].children[0].start, (7, 13));
        assert_eq!(spans[1].children[1].start, (8, 13));
        assert_eq!(spans[1].children[1].end, (8, 33));
        assert_eq!(spans[2].start, (10, 9));

        assert_eq!(item_path_at(&spans, 7, 20), vec![1, 0]);
        assert_eq!(item_path_at(&spans, 6, 9), vec![1]);
        assert_eq!(item_path_at(&spans, 6, 30), vec![1]);
        assert_eq!(item_path_at(&spans, 9, 10), vec![1]);
        assert_eq!(item_path_at(&spans, 10, 20), vec![2]);
        // Between items, in the scene's own fields, and before the scene: no item.
        assert_eq!(item_path_at(&spans, 2, 10), Vec::<usize>::new());
        assert_eq!(item_path_at(&spans, 5, 8), Vec::<usize>::new());
        assert_eq!(item_path_at(&spans, 1, 1), Vec::<usize>::new());

        assert_eq!(
            describe_path(&spans, &[0]).as_deref(),
            Some(r#"Block "corn hall" (item 1)"#)
        );
        assert_eq!(
            describe_path(&spans, &[1, 0]).as_deref(),
            Some(r#"Column "c1" (item 1 of item 2)"#)
        );
        assert_eq!(
            describe_path(&spans, &[1, 1]).as_deref(),
            Some("Point (item 2 of item 2)")
        );
        assert_eq!(
            describe_path(&spans, &[1]).as_deref(),
            Some("Group (item 2)")
        );
        assert_eq!(describe_path(&spans, &[]), None);
        assert_eq!(describe_path(&spans, &[3]), None);
        assert_eq!(describe_path(&spans, &[0, 0]), None);
    }

    #[test]
    fn groups_nested_in_groups() {
        let text = "Scene(items: [Group(items: [Group(label: \"inner\", items: [\
                    Point(at: (0, 0, 0)), Block(label: \"deep\")])]), Point(at: (1, 1, 1))])";
        let spans = item_spans(text);
        assert_eq!(
            outline(&spans),
            r#"Group[Group"inner"[Point Block"deep"]] Point"#
        );
        let deep = text.find("Block").unwrap() + 1;
        let path = item_path_at(&spans, 1, deep + 3);
        assert_eq!(path, vec![0, 0, 1]);
        assert_eq!(
            describe_path(&spans, &path).as_deref(),
            Some(r#"Block "deep" (item 2 of item 1 of item 1)"#)
        );
    }

    #[test]
    fn a_label_belongs_to_its_own_level_only() {
        // The group has no label of its own; its child's must not be taken for it, nor a
        // label inside a nested value.
        let spans = item_spans(
            r#"Scene(items: [Group(items: [Point(label: "child")], at: (label: "no")), Block(label: Some("opt"))])"#,
        );
        assert_eq!(outline(&spans), r#"Group[Point"child"] Block"opt""#);
    }

    #[test]
    fn comments_strings_and_chars_do_not_confuse_it() {
        let text = r####"
// items: [ Fake(label: "line comment") ]
Scene(
    /* items: [ Fake( /* nested */ ] ) */
    name: "a ) ] , \" items: [",
    items: [ // a comment with ( and [ and items: [
        Block(label: "say \"hi\" )", at: Centre(0, 0)), /* ] */
        Block(label: r#"raw "quoted" )"#, note: 'x', c: ')', d: '\'', e: '\u{29}'),
        Block(label: r##"two "# hashes"##),
    ],
)
"####;
        let spans = item_spans(text);
        assert_eq!(
            outline(&spans),
            r###"Block"say \"hi\" )" Block"raw \"quoted\" )" Block"two \"# hashes""###
        );
        assert_eq!(spans[0].start, (7, 9));
        assert_eq!(spans[1].start, (8, 9));
        assert_eq!(spans[2].start, (9, 9));
    }

    #[test]
    fn escapes_in_labels_are_decoded() {
        let spans = item_spans(
            "Scene(items: [A(label: \"caf\\u{e9} \\x41\\xC3\\xA9\\n\\\\ con\\\n       tinued\")])",
        );
        assert_eq!(spans[0].label.as_deref(), Some("café Aé\n\\ continued"));
    }

    #[test]
    fn crlf_line_ends_count_like_ron() {
        let text = SQUARE.replace('\n', "\r\n");
        let spans = item_spans(&text);
        assert_eq!(
            outline(&spans),
            r#"Block"corn hall" Group[Column"c1" Point] Polyline"#
        );
        // The same positions as with LF: a `\r` is only ever at the end of a line.
        assert_eq!(spans, item_spans(SQUARE));
    }

    #[test]
    fn columns_match_ron_after_the_loader_strips_the_bom() {
        // RON counts columns in characters and does not see the BOM, which the loader removes.
        let text = "\u{feff}Scene(items: [Point(at: (1, 2, 0)), Pointe(at: (1, 2, 0))])";
        let text = text.strip_prefix('\u{feff}').unwrap();
        let spans = item_spans(text);
        assert_eq!(spans[0].start, (1, 15));
        assert_eq!(spans[1].start, (1, 37));
        let err = ron::Options::default()
            .from_str::<Scene>(text)
            .expect_err("Pointe is no kind");
        assert_eq!(
            item_path_at(&spans, err.span.start.line, err.span.start.col),
            vec![1]
        );
    }

    #[test]
    fn multi_byte_characters_count_as_one_column() {
        let text = "Scene(name: \"Straße 😀\", items: [Point(at: (0, 0, 0)), Pointe(),\n  /* é */ Pointe(label: \"ß\")])";
        let spans = item_spans(text);
        assert_eq!(spans[0].start, (1, 33));
        assert_eq!(spans[0].end, (1, 53));
        assert_eq!(spans[1].start, (1, 55));
        assert_eq!(spans[2].start, (2, 11));
        // RON agrees.
        let err = ron::Options::default()
            .from_str::<Scene>(text)
            .expect_err("Pointe is no kind");
        assert_eq!(err.span.start.line, 1);
        assert_eq!(
            item_path_at(&spans, err.span.start.line, err.span.start.col),
            vec![1],
            "{err}"
        );
        let second = text.replacen("Pointe()", "Point(at: (0, 0, 0))", 1);
        let spans = item_spans(&second);
        let err = ron::Options::default()
            .from_str::<Scene>(&second)
            .expect_err("Pointe is no kind");
        assert_eq!(
            item_path_at(&spans, err.span.start.line, err.span.start.col),
            vec![2],
            "{err}"
        );
    }

    #[test]
    fn empty_lists_trailing_commas_and_no_items() {
        assert_eq!(item_spans("Scene(items: [])"), vec![]);
        assert_eq!(item_spans("Scene(items: [ , ])"), vec![]);
        assert_eq!(item_spans("Scene(name: \"x\")"), vec![]);
        assert_eq!(item_spans(""), vec![]);
        assert_eq!(
            outline(&item_spans("Scene(items: [A(), B(items: [C(),],),],)")),
            "A B[C]"
        );
        // The struct name may be left out, and attributes may come first.
        assert_eq!(
            outline(&item_spans(
                "#![enable(implicit_some)] (items: [r#Block(), (label: \"bare\")])"
            )),
            r#"Block "bare""#
        );
        assert_eq!(item_path_at(&[], 1, 1), Vec::<usize>::new());
    }

    #[test]
    fn truncated_files_keep_what_was_found() {
        let text = "Scene(items: [\n  Block(label: \"a\"),\n  Group(items: [\n    Point(at: (1, ";
        let spans = item_spans(text);
        assert_eq!(outline(&spans), r#"Block"a" Group[Point]"#);
        let eof = (4, 19);
        assert_eq!(spans[1].end, eof);
        assert_eq!(spans[1].children[0].end, eof);
        // Where RON reports the end of the text is inside the unclosed items.
        assert_eq!(item_path_at(&spans, eof.0, eof.1), vec![1, 0]);
        let err = ron::from_str::<ron::Value>(text).expect_err("truncated");
        assert_eq!(
            item_path_at(&spans, err.span.start.line, err.span.start.col),
            vec![1, 0]
        );

        // Cut inside a string or a comment: still no panic, and the item is there.
        assert_eq!(
            outline(&item_spans("Scene(items: [Block(label: \"unfinished")),
            r#"Block"unfinished""#
        );
        assert_eq!(
            outline(&item_spans("Scene(items: [Block(), /* open")),
            "Block"
        );
        assert_eq!(
            outline(&item_spans("Scene(items: [Block(label: r#\"x")),
            r#"Block"x""#
        );
    }

    #[test]
    fn never_panics_on_odd_text() {
        let odd = [
            ")))]]]}}}",
            "Scene(items: [)]",
            "Scene(items: [A(]), B)",
            "Scene(items: [A(label: ",
            "Scene(items: [A(label: Some(",
            "Scene(items: [A(items: [",
            "Scene(items: [A(items:",
            "Scene(items",
            "Scene(",
            "#",
            "#!",
            "#![",
            "r#",
            "br##",
            "'",
            "'\\",
            "\"\\u{",
            "\"\\x",
            "/*/",
            "Scene(items: [\u{0}\u{1}\u{fffd}\u{7f}, 'ab, ('), b\"\\",
        ];
        for text in odd {
            let spans = item_spans(text);
            let _ = item_path_at(&spans, 1, 1);
        }
        // Every prefix of a real scene.
        for (i, _) in SQUARE.char_indices() {
            let spans = item_spans(&SQUARE[..i]);
            let _ = item_path_at(&spans, 1, 1);
        }
        // Nesting too deep to follow is cut off, not a stack overflow.
        let deep = "G(items: [".repeat(10_000);
        let spans = item_spans(&format!("Scene(items: [{deep}"));
        assert_eq!(spans.len(), 1);
    }

    #[test]
    fn rons_errors_fall_in_the_item_they_are_about() {
        let cases = [
            // A missing field is reported at the closing parenthesis.
            ("Scene(items: [Point(at: (0, 0, 0)), Group(items: [Point(at: (1, 2, 0)), Point()])])", vec![1, 1]),
            ("Scene(items: [Group(items: [Point(at: (1, 2, 0), frob: 1)]), Point(at: (0, 0, 0))])", vec![0, 0]),
            ("Scene(items: [Point(at: (0, 0, 0)),\r\n  Group(items: [Point(at: (1, 2))])])", vec![1, 0]),
            ("Scene(items: [Point(at: (0, 0, 0)), Group(items: [])], extra: 1)", vec![]),
        ];
        for (text, path) in cases {
            let err = ron::Options::default()
                .from_str::<Scene>(text)
                .expect_err("the text has a mistake");
            let spans = item_spans(text);
            assert_eq!(
                item_path_at(&spans, err.span.start.line, err.span.start.col),
                path,
                "{text}: {err}"
            );
        }
    }

    #[test]
    fn a_field_inside_a_scene_block_is_found_where_written() {
        // A `time` in a comment, in a string and in another block come first; the one
        // wanted is the value of `time` in the `sun` block.
        let text = "#![enable(implicit_some)]\n(\n  // time: \"00:00\"\n  name: \"time: 1\",\n  \
                    location: (latitude: 1, longitude: 2, time_zone: \"UTC\"),\n  \
                    sun: Sun(date: \"2026-06-21\",\n    time: \"15:30\"),\n  items: [],\n)\n";
        assert_eq!(field_value_at(text, &["sun", "time"]), Some((7, 11)));
        assert_eq!(field_value_at(text, &["sun"]), Some((6, 8)));
        assert_eq!(
            field_value_at(text, &["location", "time_zone"]),
            Some((5, 52))
        );
        assert_eq!(field_value_at(text, &["sun", "hatch"]), None);
        assert_eq!(field_value_at(text, &["name", "time"]), None);
        // Broken text: what is there is still found, and nothing panics.
        assert_eq!(
            field_value_at("Scene(sun: (time: \"01:30\"", &["sun", "time"]),
            Some((1, 19))
        );
        assert_eq!(field_value_at(")(", &["sun", "time"]), None);
    }

    /// Enough of the scene format to get RON's error positions.
    #[allow(dead_code)]
    #[derive(Debug, serde::Deserialize)]
    #[serde(deny_unknown_fields)]
    struct Scene {
        #[serde(default)]
        name: String,
        items: Vec<Item>,
    }

    #[allow(dead_code)]
    #[derive(Debug, serde::Deserialize)]
    #[serde(deny_unknown_fields)]
    enum Item {
        Point { at: (f64, f64, f64) },
        Group { items: Vec<Item> },
    }
}
