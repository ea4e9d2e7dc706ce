// Package spectral turns rig logs of vertical accelerations into the
// frequency response functions (FRFs) that the modal fit of the body bounce
// and pitch modes uses: Welch-averaged auto and cross spectra accumulated from
// a stream of sample blocks, single- and multiple-input FRF estimators with
// coherence and random-error bands, an anti-alias decimator, a data-driven
// choice of the frequency resolution, and a CSV table writer.
//
// # Units
//
// SI units throughout: time in s, sample rates and frequencies in Hz,
// accelerations in m/s^2. An auto spectral density of acceleration is in
// (m/s^2)^2/Hz; an FRF between two accelerations is dimensionless. Phases are
// in radians inside the package and in degrees only in the CSV table.
//
// # Signs and transforms
//
// Harmonic signals are written x(t) = Re{X e^{+i omega t}}, so a system with
// FRF H(omega) turns X into H(omega) X. The discrete Fourier transform used
// is X_k = sum_{n=0}^{N-1} x_n e^{-2 pi i k n/N} (unnormalised forward
// transform, gonum's dsp/fourier), bin k lies at k fs/N Hz.
//
// # Spectral estimates (Welch's method)
//
// A record is cut into segments of N samples that advance by N - overlap
// samples; only whole segments are used. Each segment has its mean removed
// (scipy's detrend='constant') and is then multiplied by the window w. With
// X_i the transform of channel i in one segment, the spectral matrix is
//
//	G[f][i][j] = c_f * mean over segments of conj(X_i[f]) X_j[f],
//	c_f = 2/(fs sum(w^2)), except c_f = 1/(fs sum(w^2)) at DC and, for even N,
//	at the Nyquist bin (one-sided density scaling).
//
// So G[f][i][i] is the one-sided auto spectral density of channel i and
// G[f][i][j] = conj(G[f][j][i]) is the cross spectral density "from i to j".
// These are the conventions of scipy.signal's welch and csd (csd(x, y) is the
// mean of conj(X) Y), so golden files from scipy check this package.
// Windows are periodic (DFT-even) like scipy's get_window default.
//
// # FRF estimators
//
// With input channel x and output channel y:
//
//	H1 = Gxy/Gxx, H2 = Gyy/Gyx, ordinary coherence = |Gxy|^2/(Gxx Gyy) = H1/H2.
//
// The package estimates H1 (H2 serves its tests as a check).
//
// With q inputs x_1..x_q (front and rear wheel pans) and an output y, the
// multiple-input H1 solves, at each frequency, the q normal equations
//
//	sum_k Gxx[i][k] H_k = G[x_i][y],  i = 1..q,  Gxx[i][k] = G[x_i][x_k],
//
// which is H = Gyx Gxx^-1 in the row-vector notation of Bendat & Piersol
// (Gyx[i] = G[x_i][y], their matrix Gxx being the transpose of ours). The
// multiple coherence is 1 - G_yy.x/G_yy, with the residual spectrum
// G_yy.x = G_yy - sum_i conj(G[x_i][y]) H_i; the partial coherence of y with
// x_i given the other inputs is |H_i|^2 G_ii.r/(G_yy.x + |H_i|^2 G_ii.r),
// with G_ii.r = 1/(Gxx^-1)[i][i] the spectrum of x_i conditioned on the other
// inputs. With one input all of these reduce to H1 and the ordinary coherence.
//
// # Random errors
//
// Error bands are one standard deviation, from the number of averages nd and
// the coherence (Bendat & Piersol, 4th ed., 2010, Ch. 8 and 9): normalised
// random error of |H| sqrt(1-coh)/(sqrt(coh) sqrt(2 nd)), standard deviation of
// the phase the same number in radians, normalised error of the coherence
// sqrt(2)(1-coh)/(sqrt(coh) sqrt(nd)), of an auto spectrum 1/sqrt(nd). nd is
// the effective number of independent averages of overlapped windowed
// segments computed from the window's overlap correlation (Welch, 1967).
//
// # References
//
//   - J. S. Bendat and A. G. Piersol, Random Data: Analysis and Measurement
//     Procedures, 4th ed., Wiley, 2010, ISBN 978-0-470-24877-5.
//   - P. D. Welch, "The use of fast Fourier transform for the estimation of
//     power spectra: a method based on time averaging over short, modified
//     periodograms", IEEE Trans. Audio Electroacoust. AU-15(2):70-73, 1967,
//     doi:10.1109/TAU.1967.1161901.
//   - ISO 18431-2:2004, Mechanical vibration and shock - Signal processing -
//     Part 2: Time domain windows for Fourier Transform analysis.
//
// Place in the flow ingest -> identify -> compare -> plots -> cmd: the
// identify layer. It imports no package of the module: it works on blocks of
// samples, whoever reads them.
package spectral
