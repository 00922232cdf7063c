// Package convolution models one convolution of an axisymmetric bellows
// wall: its centreline (Meridian) for each profile, the r-weighted strip
// model of one pitch, the shell finite-element model (package shell) of
// half a convolution, and the dimensionless shapes on which the hoop and
// strain factors of package surrogate's generated tables are defined
// (Shape.Factors).
package convolution
