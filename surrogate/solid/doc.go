// Package solid is a two-dimensional solid finite-element model for the
// wall of one bellows convolution.
package solid
