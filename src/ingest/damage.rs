//! Damage factors: how much repair a metre of road needs before it carries relief traffic again.

use serde_json::Value;

/// Largest damage factor accepted; anything above is almost certainly a unit or typing error.
pub const MAX_FACTOR: f64 = 1000.0;

/// State of a road piece after the disaster.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Damage {
    /// Usable after repair at this factor: 0 intact, 1.0 full reconstruction, more for harder work.
    Factor(f64),
    /// Impassable and not repairable within the plan (e.g. a collapsed bridge): left out of the solve.
    Closed,
}

impl Damage {
    /// True when the piece cannot be used or repaired within the plan.
    pub fn is_closed(self) -> bool {
        matches!(self, Damage::Closed)
    }

    /// A default factor as a damage: negative means closed.
    pub fn normalised(self) -> Damage {
        match self {
            Damage::Factor(f) if f < 0.0 => Damage::Closed,
            d => d,
        }
    }

    /// The worse of two damages for one road given twice: closed beats any factor, a higher
    /// factor a lower one (so the result does not depend on which copy came first).
    pub fn worst(self, other: Damage) -> Damage {
        match (self, other) {
            (Damage::Closed, _) | (_, Damage::Closed) => Damage::Closed,
            (Damage::Factor(a), Damage::Factor(b)) => Damage::Factor(a.max(b)),
        }
    }

    /// The factor, or `None` for a closed piece.
    pub fn factor(self) -> Option<f64> {
        match self {
            Damage::Factor(f) => Some(f),
            Damage::Closed => None,
        }
    }
}

/// How a damage attribute is read from a feature's properties.
#[derive(Debug, Clone)]
pub struct DamageRule {
    /// Property holding the factor.
    pub field: String,
    /// Factor for features without the property (or with null).
    pub default: f64,
    /// Text value meaning impassable (compared case-insensitively).
    pub closed_value: String,
}

impl Default for DamageRule {
    fn default() -> Self {
        DamageRule {
            field: "damage".into(),
            default: 1.0,
            closed_value: "closed".into(),
        }
    }
}

impl DamageRule {
    /// The damage of a road without a value: the default factor, negative meaning impassable
    /// exactly as a negative value in the data does.
    pub fn missing(&self) -> Damage {
        Damage::Factor(self.default).normalised()
    }

    /// True when a property value carries no damage, so the default applies.
    pub fn is_missing(value: Option<&Value>) -> bool {
        match value {
            None | Some(Value::Null) => true,
            Some(Value::String(s)) => s.trim().is_empty(),
            Some(_) => false,
        }
    }

    /// Interprets one property value; `Err` carries a message naming what is wrong with it.
    ///
    /// Numbers (or numeric text) ≥ 0 are factors, a negative number or the closed value marks the road
    /// impassable, null or absence takes the default.
    pub fn interpret(&self, value: Option<&Value>) -> Result<Damage, String> {
        let factor = match value {
            None | Some(Value::Null) => return Ok(self.missing()),
            Some(v) if super::value::matches(v, &self.closed_value) => return Ok(Damage::Closed),
            Some(Value::Number(n)) => n.as_f64().unwrap_or(f64::NAN),
            Some(Value::String(s)) => {
                let t = s.trim();
                if t.eq_ignore_ascii_case(&self.closed_value) {
                    return Ok(Damage::Closed);
                }
                if t.is_empty() {
                    return Ok(self.missing());
                }
                match t.parse::<f64>() {
                    Ok(v) => v,
                    Err(_) => {
                        return Err(format!(
                            "value {:?} is not a number (use a factor ≥ 0, or \"{}\" for \
                             impassable)",
                            super::limits::excerpt(s),
                            self.closed_value
                        ));
                    }
                }
            }
            Some(other) => {
                return Err(format!(
                    "value {} is not a number (use a factor ≥ 0, or \"{}\" for impassable)",
                    super::limits::excerpt(&other.to_string()),
                    self.closed_value
                ));
            }
        };
        check_factor(factor)
    }
}

/// Validates a numeric factor: finite, negative means closed, at most [`MAX_FACTOR`].
pub fn check_factor(factor: f64) -> Result<Damage, String> {
    if !factor.is_finite() {
        return Err(format!(
            "value {} is not a finite number",
            crate::decimal::shown(factor)
        ));
    }
    if factor < 0.0 {
        return Ok(Damage::Closed);
    }
    if factor > MAX_FACTOR {
        return Err(format!(
            "value {} exceeds the largest accepted damage factor {MAX_FACTOR}",
            crate::decimal::shown(factor)
        ));
    }
    Ok(Damage::Factor(factor))
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn interprets_values() {
        let r = DamageRule::default();
        assert_eq!(r.interpret(None), Ok(Damage::Factor(1.0)));
        assert_eq!(r.interpret(Some(&json!(null))), Ok(Damage::Factor(1.0)));
        assert_eq!(r.interpret(Some(&json!(0))), Ok(Damage::Factor(0.0)));
        assert_eq!(r.interpret(Some(&json!(0.25))), Ok(Damage::Factor(0.25)));
        assert_eq!(r.interpret(Some(&json!(" 0.5 "))), Ok(Damage::Factor(0.5)));
        assert_eq!(r.interpret(Some(&json!(-1))), Ok(Damage::Closed));
        assert_eq!(r.interpret(Some(&json!("CLOSED"))), Ok(Damage::Closed));
        assert!(r.interpret(Some(&json!("bad"))).is_err());
        assert!(r.interpret(Some(&json!(true))).is_err());
        assert!(r.interpret(Some(&json!(1e9))).is_err());
        let by_number = DamageRule {
            closed_value: "99".into(),
            ..DamageRule::default()
        };
        assert_eq!(by_number.interpret(Some(&json!(99))), Ok(Damage::Closed));
        assert_eq!(by_number.interpret(Some(&json!(99.0))), Ok(Damage::Closed));
        assert_eq!(by_number.interpret(Some(&json!("99"))), Ok(Damage::Closed));
        assert_eq!(
            by_number.interpret(Some(&json!(9))),
            Ok(Damage::Factor(9.0))
        );
        let closed_by_default = DamageRule {
            default: -1.0,
            ..DamageRule::default()
        };
        assert_eq!(closed_by_default.interpret(None), Ok(Damage::Closed));
        assert_eq!(
            closed_by_default.interpret(Some(&json!(""))),
            Ok(Damage::Closed)
        );
    }
}
