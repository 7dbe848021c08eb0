//! Linear dependence among reactions, found incrementally and exactly.
