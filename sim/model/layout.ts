/**
 * The state layout, written down once.
 *
 *   y[I]  = i,  the series (inductor) current
 *   y[VC] = vC, the voltage on the main capacitor, behind its ESR
 *   y[VD] = vD, the voltage on the damping (snubber) capacitor, behind Rd
 *
 * The exact linear solver augments the state with two more components so that a source ramp
 * u(t) = a + b·t is part of one homogeneous system z' = M·z:
 *
 *   z[ONE]  = 1      (z[ONE]' = 0)
 *   z[TIME] = t      (z[TIME]' = z[ONE])
 *
 * A state that a circuit does not have (i when L = 0, vD without a damping branch) stays in its
 * slot with a zero derivative, so every solver shares this one layout.
 */
export const I = 0;
export const VC = 1;
export const VD = 2;
export const ONE = 3;
export const TIME = 4;

/** Number of physical states. */
export const N_STATE = 3;
/** Number of augmented states (physical + [1, t]). */
export const N_AUG = 5;
