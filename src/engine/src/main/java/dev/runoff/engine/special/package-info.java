/**
 * Special functions in log space: the regularized incomplete beta function and its complement, accurate in
 * the far tails where the functions themselves underflow double precision, plus the small numerical tools
 * the exact posterior computations share (Gauss-Legendre rules, a safeguarded root finder on log tails).
 */
package dev.runoff.engine.special;
