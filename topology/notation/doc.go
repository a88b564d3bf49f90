// Package notation writes numbers for a reader the one way every text,
// page and figure of phasonhull writes them: a value with its standard
// uncertainty to the digits that uncertainty justifies (PlusMinus,
// Rounded), and a tuple of integers as "(1, -3)" (Tuple).
//
// It is a leaf package: it imports nothing of the project, so every
// package that prints a result may use it.
package notation
