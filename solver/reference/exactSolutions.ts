/**
 * Exact solutions of the advection-diffusion equation dC/dt + u . grad C = div(K grad C) - k C (uniform
 * wind, constant diffusivities, first-order decay k), used to verify the grid solver. Formulas from
 * ../shared/REFERENCES.md, "Exact solutions of the advection-diffusion equation".
 */

export interface PuffParameters {
  /** mass released [g] */
  mass_g: number;
  /** release point [m] */
  x0_m: number;
  y0_m: number;
  /** release height [m] */
  height_m: number;
  /** uniform wind [m/s] */
  u_m_s: number;
  v_m_s: number;
  /** diffusivities [m2/s] */
  Kx_m2_s: number;
  Ky_m2_s: number;
  Kz_m2_s: number;
  /** first-order loss rate [1/s] */
  decay_per_s: number;
}

/**
 * Instantaneous point release with a reflecting ground (image source at -H), the Gaussian puff:
 *   C = M e^(-kt) / (8 (pi t)^(3/2) sqrt(Kx Ky Kz)) exp(-(x - ut)^2 / (4 Kx t) - y^2 / (4 Ky t))
 *       [exp(-(z - H)^2 / (4 Kz t)) + exp(-(z + H)^2 / (4 Kz t))]
 * (REFERENCES.md, Gaussian puff).
 *
 * @returns concentration [g/m3] at (x, y, z) [m] and time t [s] > 0
 */
export function gaussianPuff_g_m3(p: PuffParameters, x_m: number, y_m: number, z_m: number, t_s: number): number {
  const dx = x_m - p.x0_m - p.u_m_s * t_s;
  const dy = y_m - p.y0_m - p.v_m_s * t_s;
  const amplitude = (p.mass_g * Math.exp(-p.decay_per_s * t_s)) / (8 * Math.pow(Math.PI * t_s, 1.5) * Math.sqrt(p.Kx_m2_s * p.Ky_m2_s * p.Kz_m2_s));
  const horizontal = Math.exp(-(dx * dx) / (4 * p.Kx_m2_s * t_s) - (dy * dy) / (4 * p.Ky_m2_s * t_s));
  const vertical =
    Math.exp(-((z_m - p.height_m) ** 2) / (4 * p.Kz_m2_s * t_s)) + Math.exp(-((z_m + p.height_m) ** 2) / (4 * p.Kz_m2_s * t_s));
  return amplitude * horizontal * vertical;
}

/** Standard deviation of a diffusing Gaussian after time t: sigma^2 = s0^2 + 2 K t (Crank, The Mathematics of Diffusion). */
export function diffusedWidth_m(initialWidth_m: number, K_m2_s: number, t_s: number): number {
  return Math.sqrt(initialWidth_m * initialWidth_m + 2 * K_m2_s * t_s);
}

export interface SteadySourceParameters {
  /** emission rate [g/s] */
  emission_g_s: number;
  /** source position [m] */
  x0_m: number;
  y0_m: number;
  height_m: number;
  /** wind along +x [m/s] */
  u_m_s: number;
  /** isotropic diffusivity [m2/s] */
  K_m2_s: number;
  /** first-order loss rate [1/s] */
  decay_per_s: number;
}

/**
 * Steady continuous point source in uniform wind along x, isotropic K, no walls:
 *   C = Q / (4 pi K r) exp((u x - r sqrt(u^2 + 4 k K)) / (2 K)), r the distance from the source
 * (REFERENCES.md, after Stockie 2011, SIAM Review 53(2):349), plus the image source at -H for a
 * reflecting ground.
 *
 * @returns concentration [g/m3] at (x, y, z) [m]
 */
export function steadyPointSourceWithImage_g_m3(p: SteadySourceParameters, x_m: number, y_m: number, z_m: number): number {
  const dx = x_m - p.x0_m;
  const dy = y_m - p.y0_m;
  const root = Math.sqrt(p.u_m_s * p.u_m_s + 4 * p.decay_per_s * p.K_m2_s);
  const single = (dz: number): number => {
    const r = Math.sqrt(dx * dx + dy * dy + dz * dz);
    return (p.emission_g_s / (4 * Math.PI * p.K_m2_s * r)) * Math.exp((p.u_m_s * dx - r * root) / (2 * p.K_m2_s));
  };
  return single(z_m - p.height_m) + single(z_m + p.height_m);
}

/**
 * Amplitude of a Fourier mode of wavenumber m [1/m] under diffusion K after time t: exp(-K m^2 t)
 * (common practice: the sharpest peaks decay fastest).
 */
export function fourierModeAmplitude(K_m2_s: number, wavenumber_per_m: number, t_s: number): number {
  return Math.exp(-K_m2_s * wavenumber_per_m * wavenumber_per_m * t_s);
}
