//! The robustness checks of one (group, column) in `--json`: the status,
//! its reason, then every figure of [`ROBUSTNESS_FIGURES`] under its
//! stable key, in the table's order. The schema is read off the same
//! table, so the sheet, the report and its schema cannot drift apart.

use std::borrow::Cow;

use schemars::{JsonSchema, Schema, SchemaGenerator, json_schema};
use serde::Serialize;
use serde::ser::{SerializeMap, Serializer};

use super::{
    BootstrapReport, CellValue, InfluenceReport, NoiseReport, OrReason, StatusReport, Value,
};
use crate::eval::{ROBUSTNESS_FIGURES, RobustnessShape};

/// One robustness figure's value, in its shape's JSON form.
#[derive(Debug, Clone, Serialize)]
#[serde(untagged)]
pub(crate) enum RobustnessFigureReport {
    /// One number, or `{"reason": "..."}`.
    Value(Value),
    /// Flagged values with their cells.
    Cells(OrReason<Vec<CellValue>>),
    /// The largest leave-one-out change and its cell.
    Influence(OrReason<InfluenceReport>),
    /// A shape statistic against its noise.
    Noise(OrReason<NoiseReport>),
    /// The bootstrap intervals.
    Bootstrap(OrReason<BootstrapReport>),
}

/// Every figure of the robustness sheet for one (group, column).
#[derive(Debug, Clone)]
pub(crate) struct RobustnessReport {
    /// ok, note or warn.
    pub(crate) status: StatusReport,
    /// The status's reason in words.
    pub(crate) reason: String,
    /// Each figure of [`ROBUSTNESS_FIGURES`] with its key, in its order.
    pub(crate) figures: Vec<(&'static str, RobustnessFigureReport)>,
}

impl Serialize for RobustnessReport {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut map = serializer.serialize_map(Some(2 + self.figures.len()))?;
        map.serialize_entry("status", &self.status)?;
        map.serialize_entry("reason", &self.reason)?;
        for (key, value) in &self.figures {
            map.serialize_entry(key, value)?;
        }
        map.end()
    }
}

/// The schema of one shape's JSON form.
fn shape_schema(shape: &RobustnessShape, generator: &mut SchemaGenerator) -> Schema {
    match shape {
        RobustnessShape::One(..) => generator.subschema_for::<Value>(),
        RobustnessShape::Cells(_) => generator.subschema_for::<OrReason<Vec<CellValue>>>(),
        RobustnessShape::Influence(_) => generator.subschema_for::<OrReason<InfluenceReport>>(),
        RobustnessShape::Noise { .. } => generator.subschema_for::<OrReason<NoiseReport>>(),
        RobustnessShape::Bootstrap(_) => generator.subschema_for::<OrReason<BootstrapReport>>(),
    }
}

impl JsonSchema for RobustnessReport {
    fn schema_name() -> Cow<'static, str> {
        "RobustnessReport".into()
    }

    fn json_schema(generator: &mut SchemaGenerator) -> Schema {
        let mut properties = serde_json::Map::new();
        properties.insert(
            "status".into(),
            generator.subschema_for::<StatusReport>().to_value(),
        );
        properties.insert("reason".into(), json_schema!({"type": "string"}).to_value());
        for figure in ROBUSTNESS_FIGURES {
            let mut schema = shape_schema(&figure.shape, generator).to_value();
            if let Some(object) = schema.as_object_mut() {
                object.insert("description".into(), figure.about.into());
            }
            properties.insert(figure.key.into(), schema);
        }
        let figure_keys = ROBUSTNESS_FIGURES.iter().map(|f| f.key);
        let required: Vec<&str> = ["status", "reason"]
            .into_iter()
            .chain(figure_keys)
            .collect();
        json_schema!({
            "description": "Every figure of the robustness sheet for one (group, column).",
            "type": "object",
            "properties": properties,
            "required": required,
        })
    }
}
