// Package kinematics models nested, pre-curved tubes (or bellows) under the
// torsionally rigid assumption: each tube keeps its base angle along its
// whole length, so wherever the set of present tubes and their
// pre-curvatures is constant the shared backbone is a circular arc (a link).
//
// All quantities are SI: metres, radians, newtons, N·m², kg/m. Tube 1 (index
// 0) is innermost. Conventions follow objective/kinematics/REFERENCE.md: the
// base frame has z along insertion; body-frame curvature u_y > 0 bends the
// backbone toward local +x; a planar tube "pre-curved by κ" has
// u* = (0, κ, 0) in its own frame.
//
// The kinematics follow objective/kinematics/REFERENCE.md §3: EquilibriumCurvature solves the moment
// balance (3.1) of one link; Robot.Links segments the backbone (§3.2) after
// Robot.CheckActuation has checked the nesting inequalities (threads
// applied, see Thread); LinkTransform is the singularity-free closed form
// (3.2) of a link's SE(3) exponential and ArcPose the polar map of Webster &
// Jones (2010); Robot.Tip and Robot.Backbone chain the links. These are the
// reference path. A Solver evaluates the same model without allocating, for
// sweeps over many actuations. TwoTubeStability and Robot.SnapStability
// test pre-curved pairs for snap-through. The loaded shape under gravity and
// payload is package objective/statics.
package kinematics
