/** The calculators: page slug, API path, what each model is, its sources and the limits of its validity. */
export interface CalculatorInfo {
  slug: string;
  title: string;
  summary: string;
  endpoint: string;
  sources: string[];
  validity: string;
}

export const MODEL_CAUTION =
  'Estimates within their stated validity. The lacquer maker’s data and the lab’s own validation govern limits, cure schedules and additions.';

export const CALCULATORS: CalculatorInfo[] = [
  {
    slug: 'dip-thickness',
    title: 'Dip-coat film thickness',
    summary:
      'Wet and dry film thickness from viscosity and withdrawal speed (Landau–Levich drag-out with its gravity-drainage limit, one continuous model), with the capillary number and regime.',
    endpoint: '/api/v1/calc/dip-thickness',
    sources: [
      'L. Landau & B. Levich, Acta Physicochimica URSS 17 (1942) 42–54',
      'B. V. Derjaguin, Acta Physicochimica URSS 20 (1943) 349–352 (gravity–viscous limit)',
      'D. A. White & J. A. Tallmadge, Chem. Eng. Sci. 20 (1965) 33–37; Spiers, Subbaraman & Wilkinson, Chem. Eng. Sci. 29 (1974) 389–396 (one equation for both regimes)',
      'C. J. Brinker & G. W. Scherer, Sol-Gel Science (1990), ch. 13',
    ],
    validity:
      'Newtonian liquid, a lens the lacquer wets, steady withdrawal, and capillary number Ca = ηU/γ ≤ 10⁻² (a common-practice bound) for the Landau–Levich limit; above it the same model’s drainage-limited branch is shown with a warning. At hard-coat conditions (Ca 10⁻⁴–10⁻³) the model is 3–6 % below the pure Landau–Levich formula; a calibrated constant from the lab’s own films is the better guide. Dry thickness = wet × solids volume fraction ignores shrinkage beyond solvent loss.',
  },
  {
    slug: 'speed-advisor',
    title: 'Withdrawal-speed advisor',
    summary: 'The withdrawal speed that gives the target thickness at the bath’s current viscosity.',
    endpoint: '/api/v1/calc/speed-advisor',
    sources: [
      'The dip-thickness model inverted by bisection (Landau & Levich 1942; Derjaguin 1943; White & Tallmadge 1965)',
      'Brinker & Scherer 1990, ch. 13',
    ],
    validity:
      'Inverts the same film law as the dip-thickness calculator; with a calibrated constant the lab’s own fit replaces the theory and holds only over the speeds and viscosities it was fitted on.',
  },
  {
    slug: 'calibration',
    title: 'Thickness-constant calibration',
    summary: 'Fit h = C·(ηU)^k to measured thickness against speed and viscosity by least squares, with its fit quality.',
    endpoint: '/api/v1/calc/calibration',
    sources: ['Landau & Levich 1942 (exponent 2/3)', 'Ordinary least squares in log space (simple-statistics)'],
    validity:
      'Valid between the lowest and highest ηU of the measurements; r² and the residual spread say how well the law fits your lacquer.',
  },
  {
    slug: 'viscosity-cup',
    title: 'Viscosity from a flow cup',
    summary:
      'Efflux seconds → kinematic viscosity (and dynamic with a density) for Zahn, Shell, Ford, ISO 2431 and DIN 4 mm cups.',
    endpoint: '/api/v1/calc/viscosity-cup',
    sources: ['ASTM D4212 (Zahn, Shell)', 'ASTM D1200 (Ford)', 'ISO 2431', 'DIN 53211 (withdrawn)'],
    validity:
      'Each cup only inside its valid efflux window; outside it the answer is “out of range — use another cup”, never an extrapolation. The ISO 2431 and DIN constants are marked “from memory” (they could not be checked against the standards’ text): enter your cup certificate’s constants to replace them. The Zahn, Shell and Ford equations agree within 4 % with the drain times of certified viscosity standards.',
  },
  {
    slug: 'bath-addition',
    title: 'Bath addition',
    summary: 'Solvent or fresh lacquer to bring the bath’s solids back to target, by mass balance.',
    endpoint: '/api/v1/calc/bath-addition',
    sources: ['Steady-state solids mass balance (e.g. Himmelblau, Basic Principles and Calculations in Chemical Engineering)'],
    validity:
      'Assumes perfect mixing and that solvent carries no solids; the solids reading and the bath mass limit its accuracy.',
  },
  {
    slug: 'cure-equivalent',
    title: 'Equivalent cure minutes',
    summary:
      'Arrhenius equivalent minutes at a reference temperature for a temperature profile, and time at or above a temperature.',
    endpoint: '/api/v1/calc/cure-equivalent',
    sources: ['ASTM C1074 equivalent-age function (interval mean temperature)', 'Arrhenius law; R = 8.314462618 J/(mol·K)'],
    validity:
      'The activation energy must come from the lacquer maker or the lab’s validation; the sum assumes one rate-limiting reaction over the profile’s temperatures.',
  },
  {
    slug: 'cure-verdict',
    title: 'Cure verdict of a profile',
    summary:
      'Judge a planned or exported oven profile against a cure window before running it: the verdict an oven-load record would give (complete, under-cured, over-temperature, unverifiable), its reasons, equivalent minutes, time at or above the minimum and the peak.',
    endpoint: '/api/v1/calc/cure-verdict',
    sources: [
      'ASTM C1074 equivalent-age function (interval mean temperature), counted only at or above the minimum cure temperature (the datum-temperature idea of the maturity method)',
      'Arrhenius law; R = 8.314462618 J/(mol·K)',
    ],
    validity:
      'The same code as the oven-load record, on the coldest thermocouple’s profile (minute 0 is the load’s start). The window comes from the lacquer maker’s data and the lab’s validation; the verdict is advisory, and a profile judged here still needs the oven’s own records. Ovens and racks are hot.',
  },
  {
    slug: 'activation-energy',
    title: 'Activation energy from two schedules',
    summary: 'The activation energy that makes two isothermal cure schedules equivalent.',
    endpoint: '/api/v1/calc/activation-energy',
    sources: ['Arrhenius law: Ea = R·ln(tA/tB)/(1/TA − 1/TB)'],
    validity: 'Only as good as the claim that the two schedules give the same cure; the hotter schedule must be the shorter one.',
  },
  {
    slug: 'fringe-thickness',
    title: 'Thickness from reflectance fringes',
    summary: 'Coat thickness from two interference extrema, or from an uploaded reflectance spectrum.',
    endpoint: '/api/v1/calc/fringe-thickness',
    sources: ['H. A. Macleod, Thin-Film Optical Filters (normal incidence, non-absorbing film)'],
    validity:
      'Normal incidence, a non-absorbing coat, dispersion neglected. An index-matched coat shows too little contrast to measure, and the calculator says so.',
  },
  {
    slug: 'crosscut',
    title: 'Cross-cut class',
    summary: 'Percent of the lattice removed → ISO 2409 class and ASTM D3359 method B class.',
    endpoint: '/api/v1/calc/crosscut',
    sources: ['ISO 2409 Table 1', 'ASTM D3359 method B'],
    validity:
      'Classification of the estimated area removed; the estimate itself comes from the inspector against the standards’ pictures.',
  },
  {
    slug: 'abrasion',
    title: 'Bayer abrasion ratio',
    summary: 'Reference haze gain ÷ test haze gain.',
    endpoint: '/api/v1/calc/abrasion',
    sources: ['ASTM F735'],
    validity:
      'Compares lenses abraded in the same run against the uncoated CR-39 reference; ≥ 4 is called premium by common practice.',
  },
  {
    slug: 'uniformity',
    title: 'Oven uniformity survey',
    summary: 'Hottest and coldest deviation from setpoint over a multi-sensor survey and the uniformity class.',
    endpoint: '/api/v1/calc/uniformity',
    sources: ['SAE AMS2750F Table 11 furnace classes (used as a published template)'],
    validity:
      'Readings should cover the stabilised soak and carry each sensor’s calibration correction; the class table is a template, configurable per site.',
  },
  {
    slug: 'stack-reflectance',
    title: 'AR stack reflectance and colour',
    summary:
      'Edit a layer stack and see its modelled reflectance curve, residual colour (L*, a*, b*, C*, h°) and luminous reflectance, at any angle and polarisation, one or both lens faces.',
    endpoint: '/api/v1/calc/stack-reflectance',
    sources: [
      'H. A. Macleod, Thin-Film Optical Filters (characteristic-matrix method)',
      'I. H. Malitson, J. Opt. Soc. Am. 55 (1965) 1205 (fused silica); other indices marked “from memory”',
      'CIE 015:2004 Colorimetry (1931 2° observer, D65); ISO 13666 (luminous reflectance)',
    ],
    validity:
      'Homogeneous, isotropic, flat layers with sharp interfaces; the lens faces add incoherently and the lens’s own absorption is neglected. The colour is a model of the design, not of a coated lens: film indices in a real chamber differ from the table’s.',
  },
  {
    slug: 'spectrum-colour',
    title: 'Colour of a reflectance spectrum',
    summary: 'A measured or modelled spectrum → XYZ, x y, CIELAB L* a* b*, chroma, hue angle and luminous reflectance.',
    endpoint: '/api/v1/calc/spectrum-colour',
    sources: ['CIE 015:2004 Colorimetry (1931 2° observer, D65, 5 nm tables)', 'ISO 13666 (luminous reflectance, D65 × V(λ))'],
    validity:
      'The spectrum is interpolated linearly onto 380–780 nm at 5 nm and must cover at least 400–700 nm; outside its range the end values are held, with a warning. The swatch is for display only.',
  },
  {
    slug: 'colour-difference',
    title: 'Colour difference ΔE',
    summary: 'ΔE00 (CIEDE2000) and ΔE*ab (1976) between two CIELAB colours, for example the two lenses of a pair.',
    endpoint: '/api/v1/calc/colour-difference',
    sources: ['CIE 142-2001 / ISO/CIE 11664-6 (CIEDE2000)', 'G. Sharma, W. Wu & E. N. Dalal, Color Res. Appl. 30 (2005) 21–30'],
    validity: 'Reference viewing conditions (kL = kC = kH = 1). What ΔE a pair may differ by is the lab’s own setting.',
  },
  {
    slug: 'gauge-rr',
    title: 'Gauge R&R',
    summary:
      'Repeatability, reproducibility, %GRR of total variation and of tolerance, and the number of distinct categories, by ANOVA or average and range.',
    endpoint: '/api/v1/calc/gauge-rr',
    sources: [
      'AIAG, Measurement Systems Analysis reference manual, 4th ed. (2010), ch. III §B',
      'D. C. Montgomery, Introduction to Statistical Quality Control, §8.7 (ANOVA variance components)',
    ],
    validity:
      'A crossed, balanced study (every appraiser measures every part in every trial), parts spanning the process range. Average and range covers 2–3 trials, 2–3 appraisers, 2–10 parts. The interaction is pooled when its F test has p > 0.25 (common practice). Bands: < 10 % acceptable, 10–30 % conditional, > 30 % unacceptable; ndc ≥ 5.',
  },
  {
    slug: 'gauge-bias',
    title: 'Gauge bias',
    summary: 'Bias of a gauge from repeated readings of one reference part, with its t test and 95 % interval.',
    endpoint: '/api/v1/calc/gauge-bias',
    sources: ['AIAG, Measurement Systems Analysis reference manual, 4th ed. (2010), ch. III §B' + ' (independent sample method)'],
    validity:
      'At least 10 readings of one reference part by one appraiser; the readings roughly normal. Zero inside the interval means no significant bias.',
  },
  {
    slug: 'gauge-linearity',
    title: 'Gauge linearity',
    summary: 'Regression of bias on the reference value across the range, with t tests of slope and intercept.',
    endpoint: '/api/v1/calc/gauge-linearity',
    sources: ['AIAG, Measurement Systems Analysis reference manual, 4th ed. (2010), ch. III §B'],
    validity:
      'Several reference parts across the operating range, each read several times; the bias assumed to change in a straight line.',
  },
  {
    slug: 'dew-point',
    title: 'Dew point and blush risk',
    summary: 'Dew point of the room air from temperature and relative humidity, and whether a bath or lens surface is near it.',
    endpoint: '/api/v1/calc/dew-point',
    sources: [
      'O. A. Alduchov & R. E. Eskridge, J. Appl. Meteor. 35 (1996) 601–609 (Magnus coefficients over water)',
      'ISO 8502-4 (condensation on surfaces; the 3 °C margin is common practice)',
    ],
    validity:
      'Air from −40 to +50 °C, over water (not ice). The margin is a setting; the lacquer maker’s data on humidity limits governs.',
  },
];

export function calculator(slug: string): CalculatorInfo {
  const c = CALCULATORS.find((x) => x.slug === slug);
  if (!c) throw new Error(`no calculator ${slug}`);
  return c;
}
