//! Parsers for command-line values, shared by the subcommands: each refuses what cannot be
//! drawn with a message naming what was expected.

pub fn parse_finite(text: &str) -> Result<f64, String> {
    let value: f64 = text
        .trim()
        .parse()
        .map_err(|_| format!("expected a number, found \"{text}\""))?;
    if value.is_finite() {
        Ok(value)
    } else {
        Err(format!("expected a finite number, found \"{text}\""))
    }
}

pub fn parse_non_negative(text: &str) -> Result<f64, String> {
    let value = parse_finite(text)?;
    if value >= 0.0 {
        Ok(value)
    } else {
        Err(format!("expected zero or more, found {value}"))
    }
}

pub fn parse_pair(text: &str) -> Result<(f64, f64), String> {
    let (x, y) = text
        .split_once(',')
        .ok_or_else(|| format!("expected X,Y, found \"{text}\""))?;
    Ok((parse_finite(x)?, parse_finite(y)?))
}

pub fn parse_size(text: &str) -> Result<(u32, u32), String> {
    let (w, h) = text
        .split_once(['x', 'X'])
        .ok_or_else(|| format!("expected WIDTHxHEIGHT such as 4096x2048, found \"{text}\""))?;
    let number = |s: &str| {
        s.trim()
            .parse::<u32>()
            .map_err(|_| format!("expected a whole number of pixels, found \"{s}\""))
    };
    Ok((number(w)?, number(h)?))
}
