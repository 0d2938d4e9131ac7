//! Paper sizes: the usual presets by name, or any size in millimetres or inches.

/// A paper size in millimetres, portrait (width at most height) as the standards list them.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Paper {
    /// Width, millimetres.
    pub width_mm: f64,
    /// Height, millimetres.
    pub height_mm: f64,
}

/// Millimetres in an inch (exact, by the international yard and pound agreement of 1959).
pub const MM_PER_INCH: f64 = 25.4;

/// The named sizes: ISO 216 A and B series (millimetres, from the standard's table), the
/// North American Letter, Legal and Tabloid, and the ASME Y14.1 drawing sheets A to E
/// (inches).
const PRESETS: &[(&str, f64, f64, bool)] = &[
    ("A0", 841.0, 1189.0, false),
    ("A1", 594.0, 841.0, false),
    ("A2", 420.0, 594.0, false),
    ("A3", 297.0, 420.0, false),
    ("A4", 210.0, 297.0, false),
    ("A5", 148.0, 210.0, false),
    ("A6", 105.0, 148.0, false),
    ("B0", 1000.0, 1414.0, false),
    ("B1", 707.0, 1000.0, false),
    ("B2", 500.0, 707.0, false),
    ("B3", 353.0, 500.0, false),
    ("B4", 250.0, 353.0, false),
    ("B5", 176.0, 250.0, false),
    ("B6", 125.0, 176.0, false),
    ("LETTER", 8.5, 11.0, true),
    ("LEGAL", 8.5, 14.0, true),
    ("TABLOID", 11.0, 17.0, true),
    ("ASME-A", 8.5, 11.0, true),
    ("ASME-B", 11.0, 17.0, true),
    ("ASME-C", 17.0, 22.0, true),
    ("ASME-D", 22.0, 34.0, true),
    ("ASME-E", 34.0, 44.0, true),
];

/// The names [`Paper::named`] knows, for messages.
pub fn preset_names() -> String {
    PRESETS
        .iter()
        .map(|(name, ..)| name.to_lowercase())
        .collect::<Vec<_>>()
        .join(", ")
}

impl Paper {
    /// A preset by name, any case: `a4`, `B5`, `letter`, `asme-c`.
    pub fn named(name: &str) -> Option<Paper> {
        let upper = name.trim().to_uppercase();
        PRESETS
            .iter()
            .find(|(preset, ..)| *preset == upper)
            .map(|&(_, w, h, inches)| {
                let unit = if inches { MM_PER_INCH } else { 1.0 };
                Paper {
                    width_mm: w * unit,
                    height_mm: h * unit,
                }
            })
    }

    /// A preset name, or a size `WIDTHxHEIGHT` followed by `mm` (the default) or `in`:
    /// `a3`, `420x297mm`, `11x17in`.
    pub fn parse(text: &str) -> crate::Result<Paper> {
        if let Some(paper) = Paper::named(text) {
            return Ok(paper);
        }
        let lower = text.trim().to_lowercase();
        let (numbers, unit) = if let Some(n) = lower.strip_suffix("mm") {
            (n, 1.0)
        } else if let Some(n) = lower.strip_suffix("in") {
            (n, MM_PER_INCH)
        } else {
            (lower.as_str(), 1.0)
        };
        let size = numbers.split_once('x').and_then(|(w, h)| {
            let (w, h) = (w.trim().parse::<f64>().ok()?, h.trim().parse::<f64>().ok()?);
            (w.is_finite() && h.is_finite() && w > 0.0 && h > 0.0).then_some((w, h))
        });
        match size {
            Some((w, h)) if w * unit <= MAX_SIDE_MM && h * unit <= MAX_SIDE_MM => Ok(Paper {
                width_mm: w * unit,
                height_mm: h * unit,
            }),
            Some(_) => Err(crate::Error::Setting(format!(
                "a sheet larger than {MAX_SIDE_MM} mm a side"
            ))),
            None => Err(crate::Error::Setting(format!(
                "expected a paper name ({}) or a size such as 420x297mm or 11x17in, found \"{text}\"",
                preset_names()
            ))),
        }
    }

    /// The same sheet turned so that its long side runs across.
    pub fn landscape(self) -> Paper {
        Paper {
            width_mm: self.width_mm.max(self.height_mm),
            height_mm: self.width_mm.min(self.height_mm),
        }
    }

    /// The same sheet turned so that its long side runs down.
    pub fn portrait(self) -> Paper {
        Paper {
            width_mm: self.width_mm.min(self.height_mm),
            height_mm: self.width_mm.max(self.height_mm),
        }
    }
}

/// The largest sheet side accepted: 10 m, a mural.
pub const MAX_SIDE_MM: f64 = 10_000.0;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_and_sizes_parse() {
        assert_eq!(
            Paper::parse("a4").unwrap(),
            Paper {
                width_mm: 210.0,
                height_mm: 297.0
            }
        );
        assert_eq!(
            Paper::parse("420x297mm").unwrap(),
            Paper {
                width_mm: 420.0,
                height_mm: 297.0
            }
        );
        let tabloid = Paper::parse("11x17in").unwrap();
        assert!(
            (tabloid.width_mm - 279.4).abs() < 1e-9 && (tabloid.height_mm - 431.8).abs() < 1e-9
        );
        assert!(Paper::parse("a7").is_err());
        assert!(Paper::parse("0x10").is_err());
        assert!(Paper::parse("nanxinf").is_err());
        assert!(Paper::parse("20000x10mm").is_err());
        assert_eq!(Paper::parse("A4").unwrap().landscape().width_mm, 297.0);
    }
}
