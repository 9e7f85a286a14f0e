#pragma once
// The EWMA Markov chain of Lucas & Saccucci (1990), private to rigcal_core: shared by ewma_arl and
// by the design, which root-finds on the cheap coarse chain before refining on the extrapolated one.
namespace rigcal::detect::detail {

// Cells of the coarse chain for a band of half-width limit: odd, so that a cell is centred on the
// start W = 0, and at most 0.2 lambda wide.
int ewma_coarse_cells(double lambda, double limit);

// ARL from W = 0 of the chain with `cells` cells (odd), observations N(mu, 1). Raw: its error falls as
// cells^-2 (about 1 % at ARL0 ~ 500 with the coarse count, more at larger ARL0).
double ewma_chain_arl(double lambda, double limit, double mu, int cells);

// Richardson extrapolation from coarse_cells (odd; normally ewma_coarse_cells) and 2 coarse_cells + 1
// cells. Relative error about 2e-5 at ARL ~ 500 and 3e-4 at ARL ~ 3e7 in control; far smaller out of
// control (1e-6 at ARL ~ 100). +infinity when the ARL is beyond what the chain resolves.
// With the cell count held fixed the result is a smooth function of limit, which root-finding needs.
double ewma_extrapolated_arl(double lambda, double limit, double mu, int coarse_cells);

}  // namespace rigcal::detect::detail
