// Package statics solves the loaded shape of a nested set of bellows: the
// set acting as one Cosserat rod under gravity, a payload, tip loads and
// point forces, on the links that package kinematics computes. Solve and
// TipSag take links; SolveRobot and RobotTipSag take a robot and an
// actuation; LinearTipDeflection is the small-load linear estimate.
//
// The model (objective/statics/REFERENCE.md §1). With rigid torsion the set is one inextensible, unshearable rod with
// link-wise constant composite stiffness K and precurvature u* (the link's
// equilibrium curvature U):
//
//	p' = R e3,  R' = R û,  u = u* + K⁻¹ Rᵀ m,  n' = −f,  m' = −p' × n      (1.1)
//
// with p(0) = 0, R(0) = I, n(L) = F_tip, m(L) = M_tip [derived; the
// externally loaded concentric-tube model with relative twists frozen, from
// memory (verify): Rucker, Jones & Webster, IEEE T-RO 26(5), 2010; Rucker &
// Webster, IEEE T-RO 27(6), 2011]. The boundary-value problem is solved by
// shooting with classical RK4 and a Levenberg–Marquardt iteration on the
// base loads (objective/statics/REFERENCE.md §2).
package statics
