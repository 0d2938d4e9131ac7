//! The library's one error type. Each variant keeps its cause and says where; the binary
//! prints the chain and picks the exit code from [`Error::is_bad_input`].

use std::path::PathBuf;

/// Everything that can go wrong in the library, bad input and failures alike.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// The scene file cannot be understood; `line` and `column` count from 1.
    #[error("{}:{line}:{column}: {message}", path.display())]
    Scene {
        /// The file, as the user named it.
        path: PathBuf,
        /// The line, from 1.
        line: usize,
        /// The column, from 1, in characters.
        column: usize,
        /// What is wrong and what was expected, in words.
        message: String,
    },

    /// An open-data file (GeoJSON, CityJSON) holds something pansite cannot use: `at` names
    /// the feature or city object and the JSON path.
    #[error("{}: {at}: {message}", path.display())]
    Data {
        /// The data file.
        path: PathBuf,
        /// The feature or city object, and the JSON path.
        at: String,
        /// What is wrong and what was expected.
        message: String,
    },

    /// A file could not be read.
    #[error("cannot read {}", path.display())]
    Read {
        /// The file.
        path: PathBuf,
        /// Why.
        #[source]
        source: std::io::Error,
    },

    /// A file could not be written.
    #[error("cannot write {}", path.display())]
    Write {
        /// The file.
        path: PathBuf,
        /// Why.
        #[source]
        source: std::io::Error,
    },

    /// A model or data file named in a scene could not be read.
    // The cause follows in the chain the command prints (`{:#}`), so it is not repeated here.
    #[error("{}:{line}:{column}: in the {kind} \"{item}\"", scene.display())]
    InModel {
        /// The scene that names the file.
        scene: PathBuf,
        /// What the file is to the scene: `model` (OBJ) or `data file` (GeoJSON, CityJSON).
        kind: &'static str,
        /// The line of the `Model` item, from 1.
        line: usize,
        /// Its column, from 1.
        column: usize,
        /// How the item is named in messages.
        item: String,
        /// What went wrong reading the model.
        #[source]
        source: Box<Error>,
    },

    /// A standpoint was asked for by a name the scene does not have.
    #[error("the scene has no standpoint named \"{name}\" (it has: {available})")]
    UnknownStandpoint {
        /// The name asked for.
        name: String,
        /// The scene's standpoints, listed for the message.
        available: String,
    },

    /// Nothing says where to stand.
    #[error("the scene names no standpoint: add one to its `standpoints` or give --at X,Y")]
    NoStandpoint,

    /// A setting outside what can be drawn (an image size, a tolerance, a line weight).
    #[error("{0}")]
    Setting(String),

    /// A date, local time or place the sun cannot be found for (an unknown time zone, a
    /// local time skipped or repeated by a clock change, a year outside the method's range).
    #[error("{0}")]
    Sun(String),

    /// Refused before anything was allocated.
    #[error("an image of {width}x{height} pixels is {reason}")]
    ImageSize {
        /// Pixels across.
        width: u64,
        /// Pixels down.
        height: u64,
        /// Why that cannot be drawn.
        reason: String,
    },

    /// More of something than one run may hold (see [`crate::budget`]).
    #[error("{what}: {found} is more than the limit of {limit}; {advice}")]
    TooLarge {
        /// What there is too much of.
        what: &'static str,
        /// How much there is.
        found: u64,
        /// How much one run may hold.
        limit: u64,
        /// What the user can do about it.
        advice: &'static str,
    },

    /// The run would outlast its time limit (see [`crate::budget`]).
    #[error("{}", too_slow(stage, *elapsed_s, *done_percent, *estimate_s, *limit_s))]
    TooSlow {
        /// The stage that was running.
        stage: &'static str,
        /// Seconds spent so far.
        elapsed_s: f64,
        /// How much of the stage was done.
        done_percent: f64,
        /// The whole run's time as its progress so far suggests.
        estimate_s: Option<f64>,
        /// The time limit, seconds.
        limit_s: f64,
    },

    /// The PNG encoder failed.
    #[error("PNG encoding failed")]
    Png(#[from] png::EncodingError),

    /// A vector page (SVG, PDF) could not be handed to its writer; the caller knows where
    /// it was going and adds that.
    #[error("cannot write the page")]
    Output(#[source] std::io::Error),
}

impl Error {
    /// Whether the user can fix this by changing their input or options (exit code 2),
    /// as opposed to a failure of the machine or of pansite (exit code 1).
    pub fn is_bad_input(&self) -> bool {
        match self {
            Error::Scene { .. }
            | Error::Data { .. }
            | Error::UnknownStandpoint { .. }
            | Error::NoStandpoint
            | Error::Setting(_)
            | Error::Sun(_)
            | Error::ImageSize { .. }
            | Error::TooLarge { .. }
            | Error::TooSlow { .. } => true,
            Error::Read { source, .. } => matches!(
                source.kind(),
                std::io::ErrorKind::NotFound
                    | std::io::ErrorKind::IsADirectory
                    | std::io::ErrorKind::InvalidInput
                    | std::io::ErrorKind::PermissionDenied
            ),
            Error::InModel { source, .. } => source.is_bad_input(),
            Error::Write { .. } | Error::Png(_) | Error::Output(_) => false,
        }
    }
}

fn too_slow(
    stage: &str,
    elapsed_s: f64,
    done_percent: f64,
    estimate_s: Option<f64>,
    limit_s: f64,
) -> String {
    let estimate = estimate_s.map_or(String::new(), |e| {
        format!(", so the run would take about {}", duration_words(e))
    });
    let progress = if done_percent >= 1.0 {
        format!("{done_percent:.0}% of the way")
    } else if done_percent > 0.0 {
        format!("{done_percent:.2}% of the way")
    } else {
        "at its start".to_owned()
    };
    format!(
        "stopped in the {stage} stage after {}, {progress}{estimate}; the time limit is {} \
         (draw a smaller --size, use --hidden solid, simplify the scene, or raise --time-limit)",
        duration_words(elapsed_s),
        duration_words(limit_s)
    )
}

/// The library's result, with [`Error`] by default.
pub type Result<T, E = Error> = std::result::Result<T, E>;

/// Says how long `seconds` is in words a user reads at a glance.
pub fn duration_words(seconds: f64) -> String {
    if seconds < 10.0 {
        format!("{seconds:.3} s")
    } else if seconds < 120.0 {
        format!("{seconds:.0} s")
    } else if seconds < 7200.0 {
        format!("{:.0} minutes", seconds / 60.0)
    } else {
        format!("{:.1} hours", seconds / 3600.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn durations_in_words() {
        assert_eq!(duration_words(0.05), "0.050 s");
        assert_eq!(duration_words(50.0), "50 s");
        assert_eq!(duration_words(600.0), "10 minutes");
        assert_eq!(duration_words(4.0 * 3600.0), "4.0 hours");
    }
}
