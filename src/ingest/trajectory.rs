//! Well trajectories by the minimum curvature method.
