// Package decide holds the decisions an engineer makes from rankings:
// the worst case of a part at its datasheet limits and the spread between
// the leaders (decide.go), the price-loss front, a replacement judged
// component by component against the fitted part (CompareParts), weighted
// load profiles (profile.go), sweeps of one variable with the crossovers
// where the best part changes (sweep.go), and paralleled devices with the
// best count (parallel.go). It takes prepared devices and stages and uses
// rank and rank/evaluate; nothing below it imports it.
package decide
