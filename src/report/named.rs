//! Figures keyed by name, in the order they were computed: a panel's
//! figures (keys from the panel's own labels) and a figures block's.

use std::borrow::Cow;

use schemars::{JsonSchema, Schema, SchemaGenerator, json_schema};
use serde::ser::{Serialize, SerializeMap, Serializer};

use super::Value;
use crate::eval::PANEL_FIGURES;

/// Values by name, serialised as one JSON object in their own order.
#[derive(Debug, Clone, PartialEq, Default)]
pub(crate) struct NamedValues(pub Vec<(String, Value)>);

impl Serialize for NamedValues {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        let mut map = serializer.serialize_map(Some(self.0.len()))?;
        for (name, value) in &self.0 {
            map.serialize_entry(name, value)?;
        }
        map.end()
    }
}

impl JsonSchema for NamedValues {
    fn schema_name() -> Cow<'static, str> {
        "NamedValues".into()
    }

    fn json_schema(generator: &mut SchemaGenerator) -> Schema {
        let value = generator.subschema_for::<Value>();
        json_schema!({
            "description": "Each figure by the name the recipe gives it.",
            "type": "object",
            "additionalProperties": value,
        })
    }
}

/// The standard panel's figures, keyed by each figure's stable key in
/// [`PANEL_FIGURES`] (`n`, `mean`, ..., `bowley_skewness`, ...).
#[derive(Debug, Clone, PartialEq)]
pub(crate) struct PanelFigures(pub NamedValues);

impl PanelFigures {
    /// Pairs the panel's figures with their keys; both come from the panel's definition.
    pub(crate) fn new(figures: &[crate::eval::One]) -> PanelFigures {
        PanelFigures(NamedValues(
            PANEL_FIGURES
                .iter()
                .zip(figures)
                .map(|(f, v)| (f.key.to_string(), super::build::value(v)))
                .collect(),
        ))
    }
}

impl Serialize for PanelFigures {
    fn serialize<S: Serializer>(&self, serializer: S) -> Result<S::Ok, S::Error> {
        self.0.serialize(serializer)
    }
}

impl JsonSchema for PanelFigures {
    fn schema_name() -> Cow<'static, str> {
        "PanelFigures".into()
    }

    fn json_schema(generator: &mut SchemaGenerator) -> Schema {
        let value = generator.subschema_for::<Value>().to_value();
        let keys: Vec<&str> = PANEL_FIGURES.iter().map(|f| f.key).collect();
        let properties: serde_json::Map<String, serde_json::Value> = keys
            .iter()
            .map(|k| (k.to_string(), value.clone()))
            .collect();
        json_schema!({
            "description": "The standard panel's figures, in the panel sheet's order.",
            "type": "object",
            "properties": properties,
            "required": keys,
            "additionalProperties": false,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn panel_keys_are_distinct_snake_case() {
        let keys: std::collections::HashSet<&str> = PANEL_FIGURES.iter().map(|f| f.key).collect();
        assert_eq!(keys.len(), PANEL_FIGURES.len(), "two figures share a key");
        for k in &keys {
            assert!(
                k.chars()
                    .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '_'),
                "{k}"
            );
        }
    }
}
