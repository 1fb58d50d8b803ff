//! Simple, ordinary and external-drift kriging with kriging variance.
