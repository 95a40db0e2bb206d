//! The plain-words verdict on image motion, shared by the terminal text and the HTML page.
//! Thresholds on the probability that the star's centre is outside ½ px: below 1 % holds, up to
//! 50 % marginal, above that does not hold (common practice, no source).

/// How the rig does against the ½-pixel mark.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Level {
    Holds,
    Marginal,
    DoesNotHold,
}

impl Level {
    /// The level for a probability of being outside ½ px.
    pub fn from_p_outside(p: f64) -> Level {
        if p < 0.01 {
            Level::Holds
        } else if p < 0.5 {
            Level::Marginal
        } else {
            Level::DoesNotHold
        }
    }

    /// "holds", "marginal" or "does not hold".
    pub fn words(self) -> &'static str {
        match self {
            Level::Holds => "holds",
            Level::Marginal => "marginal",
            Level::DoesNotHold => "does not hold",
        }
    }

    /// The rule behind the level.
    pub fn rule(self) -> &'static str {
        match self {
            Level::Holds => "outside 1/2 px less than 1 % of the time",
            Level::Marginal => "outside 1/2 px 1-50 % of the time",
            Level::DoesNotHold => "outside 1/2 px most of the time",
        }
    }
}
