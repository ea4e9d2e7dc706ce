// Package lsq minimises a sum of squared residuals over a parameter vector by
// Levenberg-Marquardt, the nonlinear least-squares solver behind every fit of
// the module: the pole-residue refinement of the rig fit, the free-decay
// refinement of the drop fit and the least-squares model update.
//
// For residuals e(x) (rows of them, in whatever units the caller whitens them
// to) with Jacobian J = de/dx, each iteration solves Marquardt's scaled normal
// equations
//
//	(J^T J + mu diag(J^T J)) dx = J^T e
//
// by Cholesky (gonum's mat) and tries x - dx. A step that lowers the cost
// sum e_i^2 is taken and mu shrinks tenfold (not below 1e-12); a step that
// does not lower it, or normal equations that do not factorise, make mu grow
// tenfold and the step is tried again, up to mu = 1e12. The solver stops when
// an accepted step lowers the cost by less than Settings.RelativeTolerance of
// it, when no step up to the largest mu lowers it (a minimum to working
// precision), or after Settings.MaxIterations accepted steps.
//
// Scaling by diag(J^T J) makes the steps independent of the units of each
// parameter; a parameter that no residual depends on (a zero column of J)
// leaves the normal equations singular at every mu and the solver at its
// start. The solver finds a local minimum near the start: the callers start it
// from a linear or closed-form estimate.
//
// References: K. Levenberg, "A method for the solution of certain non-linear
// problems in least squares", Quarterly of Applied Mathematics 2(2):164-168,
// 1944; D. W. Marquardt, "An algorithm for least-squares estimation of
// nonlinear parameters", Journal of the Society for Industrial and Applied
// Mathematics 11(2):431-441, 1963, doi:10.1137/0111030.
//
// Written here because gonum has no least-squares solver: gonum/optimize
// minimises a general scalar function (BFGS, Newton, Nelder-Mead and
// others), which would ignore the structure of a sum of squares that
// Levenberg-Marquardt uses, J^T J as the curvature from first derivatives
// alone.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// identify layer, used by identify's fits and by compare's update. It may
// import only the standard library and gonum, no package of the module.
package lsq
