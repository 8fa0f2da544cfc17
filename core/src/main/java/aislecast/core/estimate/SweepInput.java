package aislecast.core.estimate;

import aislecast.core.model.LocalParams;
import java.io.Serializable;

/**
 * What the driver broadcasts to every store for one sweep: each chain's globals in local form,
 * and the ridge moves (see {@link RidgeMove}): per chain, the psi shift accepted at the end of the
 * previous sweep, which stores apply before anything else, and the shift to propose in this one
 * (null when none).
 *
 * @param params per chain
 * @param applyShift per chain: Kpsi-vector to apply first, or null
 * @param proposeShift per chain: Kpsi-vector to evaluate after the local transitions, or null
 */
public record SweepInput(LocalParams[] params, double[][] applyShift, double[][] proposeShift)
    implements Serializable {}
