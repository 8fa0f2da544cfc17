package aislecast.core.estimate;

import aislecast.core.model.LocalParams;
import java.io.Serializable;

/**
 * What the driver broadcasts to every store for one sweep: each chain's globals in local form,
 * and the ridge moves (see {@link RidgeMove}): the shift accepted at the end of the previous
 * sweep, which stores apply before anything else, and the shift to propose in this one.
 *
 * @param params per chain
 * @param applyShift per chain: shift to apply first (0 = none)
 * @param proposeShift per chain: shift to evaluate after the local transitions (0 = none)
 */
public record SweepInput(LocalParams[] params, double[] applyShift, double[] proposeShift)
    implements Serializable {}
