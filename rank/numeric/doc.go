// Package numeric holds the scalar numerics the models and the thermal
// solve share: a bracketed root finder (FindRoot). It knows nothing of
// power electronics: it takes functions of a float64 and gives their
// roots with the tolerance asked for.
package numeric
