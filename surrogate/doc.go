// Package surrogate turns bellows geometry and material into the section
// properties a rod model needs: axial stiffness per convolution and EA, the
// 2×2 bending stiffness tensor, GJ, mass per length, and the convolution
// opening and peak wall strain per unit curvature change.
//
// All quantities are SI: metres, pascals, newtons, N·m², kg/m, radians.
package surrogate
