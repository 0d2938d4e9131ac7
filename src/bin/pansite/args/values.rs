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

/// A scale `1:N` (or `N`), as its denominator N: a plan at 1:N shows a metre as 1000 / N mm.
pub fn parse_scale(text: &str) -> Result<f64, String> {
    let number = match text.trim().split_once(':') {
        Some((one, n)) if one.trim() == "1" => n,
        Some(_) => {
            return Err(format!(
                "expected a scale 1:N such as 1:200, found \"{text}\""
            ))
        }
        None => text,
    };
    let n = parse_finite(number)?;
    if (1.0..=1e7).contains(&n) {
        Ok(n)
    } else {
        Err(format!(
            "expected a scale from 1:1 to 1:10000000 (a reduction), found \"{text}\""
        ))
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

/// A WGS84 latitude and longitude, degrees: `51.4779,-0.0015`.
pub fn parse_latlon(text: &str) -> Result<(f64, f64), String> {
    let (lat, lon) = parse_pair(text)?;
    if !(-90.0..=90.0).contains(&lat) {
        return Err(format!(
            "expected a latitude from -90 to 90 degrees first, found {lat}"
        ));
    }
    if !(-180.0..=180.0).contains(&lon) {
        return Err(format!(
            "expected a longitude from -180 to 180 degrees, found {lon}"
        ));
    }
    Ok((lat, lon))
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

pub fn parse_triple(text: &str) -> Result<(f64, f64, f64), String> {
    let parts: Vec<&str> = text.split(':').collect();
    match parts[..] {
        [a, b, c] => Ok((parse_finite(a)?, parse_finite(b)?, parse_finite(c)?)),
        _ => Err(format!("expected FROM:TO:STEP, found \"{text}\"")),
    }
}

/// The plan positions of a path sweep (a type of its own: clap reads a bare `Vec` as a
/// repeated option).
#[derive(Clone, Debug, PartialEq)]
pub struct PathSweep(pub Vec<(f64, f64)>);

pub fn parse_path(text: &str) -> Result<PathSweep, String> {
    let points = text
        .split(':')
        .map(parse_pair)
        .collect::<Result<Vec<_>, _>>()?;
    if points.len() < 2 {
        return Err(format!(
            "expected at least two points X,Y:X,Y, found \"{text}\""
        ));
    }
    Ok(PathSweep(points))
}

/// A grid sweep: two opposite corners and the columns and rows.
pub type GridSweep = ((f64, f64), (f64, f64), (u32, u32));

pub fn parse_grid(text: &str) -> Result<GridSweep, String> {
    let parts: Vec<&str> = text.split(':').collect();
    match parts[..] {
        [a, b, counts] => Ok((parse_pair(a)?, parse_pair(b)?, parse_size(counts)?)),
        _ => Err(format!("expected X0,Y0:X1,Y1:CxR, found \"{text}\"")),
    }
}

/// COLUMNSxROWS sheets to split a page over, 1x1 to 20x20.
pub fn parse_tiles(text: &str) -> Result<(u32, u32), String> {
    let bad = || format!("expected COLUMNSxROWS from 1x1 to 20x20, such as 3x2, found \"{text}\"");
    let (c, r) = text.split_once(['x', 'X']).ok_or_else(bad)?;
    let count = |s: &str| {
        s.trim()
            .parse::<u32>()
            .ok()
            .filter(|n| (1..=20).contains(n))
    };
    match (count(c), count(r)) {
        (Some(c), Some(r)) => Ok((c, r)),
        _ => Err(bad()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sweep_values_parse() {
        assert_eq!(parse_triple("0:345:15"), Ok((0.0, 345.0, 15.0)));
        assert_eq!(
            parse_path("0,-1:2,3").unwrap(),
            PathSweep(vec![(0.0, -1.0), (2.0, 3.0)])
        );
        assert_eq!(
            parse_grid("-5,-5:5,5:3x2"),
            Ok(((-5.0, -5.0), (5.0, 5.0), (3, 2)))
        );
        assert!(parse_triple("0:345").is_err());
        assert!(parse_path("0,0").is_err());
        assert!(parse_grid("0,0:1,1").is_err());
    }
}
