// Package robust measures how a waveform's fidelity holds up under errors:
// one-dimensional sweeps along an error axis, a two-dimensional map, the
// edges and width of the region where the fidelity stays above a threshold
// (DefaultThreshold), and the error budget term by term.
//
// Every batch of simulations runs on a pool of workers, each with its own
// simulation workspace (Worker, RunJobs); results land in fixed slots, so
// they are bit-identical on any number of cores. Progress goes to a
// callback (SweepOptions.OnProgress); drawing it is the caller's business.
package robust
