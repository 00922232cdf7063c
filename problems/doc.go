// Package problems turns plica's input files into SI physics types and a
// search problem. LoadDesign reads a design file into an objective.Design and
// objective.Scenario; LoadProblem reads a problem file (a design whose
// variables may be ranges or lists, plus objectives, constraints and search
// settings) into a Spec, compiled once into a typed template from which
// SearchProblem evaluates candidates without reading any file; LoadBench and
// LoadCalibration read bench measurements and calibration files. Units appear
// in key and column names (wall_mm) and are converted on the way in.
//
// Every input mistake is an *Error naming file, line, column, key and what
// was expected; a file's mistakes are collected into Errors, and every input
// error matches errors.Is(err, ErrInput). The shipped examples are in
// problems/examples.
package problems
