/**
 * Answers of the quality endpoints: tests, files, adhesion figures, trace, holds and nonconformances.
 * Each schema is the JSON the service returns; `src/lib/server/api-answers.ts` fails to compile when a
 * service's return type stops fitting its schema.
 */
import { z } from 'zod';

/** What `listTests` (one element) answers (`src/lib/server/services/quality.ts`). */
export const TestListItemSchema = z.object({
  id: z.number(),
  jobNumber: z.string(),
  kind: z.enum(['crosscut', 'boil', 'abrasion', 'thickness', 'cosmetic']),
  result: z.enum(['pass', 'fail']),
  testedAt: z.string(),
  testedBy: z.string(),
  summary: z.string(),
  computed: z.record(z.string(), z.unknown()),
  boilCycles: z.number().nullable(),
  reasons: z.array(z.string()),
  files: z.number(),
  loadId: z.number().nullable(),
  ovenCode: z.string().nullable(),
  jobStatus: z.string(),
});

/** What `createTest` answers (`src/lib/server/services/quality.ts`). */
export const RecordedTestSchema = z.object({
  id: z.number(),
  jobId: z.number(),
  jobNumber: z.string(),
  kind: z.string(),
  result: z.enum(['pass', 'fail']),
  computed: z.record(z.string(), z.unknown()),
  reasons: z.array(z.string()),
  summary: z.string(),
  fileIds: z.array(z.number()),
});

/** What `getTest` answers (`src/lib/server/services/quality.ts`). */
export const TestDetailSchema = z.object({
  inputs: z.record(z.string(), z.unknown()),
  note: z.string().nullable(),
  acceptance: z.object({
    crosscutMaxIso: z.number(),
    boilMaxIso: z.number(),
    minBayerRatio: z.number(),
    thicknessUm: z.object({
      min: z.number(),
      max: z.number(),
    }),
    cosmeticMaxPerType: z.object({
      crazing: z.number(),
      cracks: z.number(),
      peeling: z.number(),
      'runs-sags': z.number(),
      'drips-edge-bead': z.number(),
      'dust-inclusions': z.number(),
      pinholes: z.number(),
      'orange-peel': z.number(),
      haze: z.number(),
      scratches: z.number(),
      other: z.number(),
    }),
  }),
  fileList: z.array(
    z.object({
      id: z.number(),
      filename: z.string(),
      mime: z.string(),
      sizeBytes: z.number(),
      sha256: z.string(),
      uploadedAt: z.string(),
      uploadedBy: z.string().nullable(),
    }),
  ),
  id: z.number(),
  jobNumber: z.string(),
  kind: z.enum(['crosscut', 'boil', 'abrasion', 'thickness', 'cosmetic']),
  result: z.enum(['pass', 'fail']),
  testedAt: z.string(),
  testedBy: z.string(),
  summary: z.string(),
  computed: z.record(z.string(), z.unknown()),
  boilCycles: z.number().nullable(),
  reasons: z.array(z.string()),
  files: z.number(),
  loadId: z.number().nullable(),
  ovenCode: z.string().nullable(),
  jobStatus: z.string(),
});

/** What `uploadTestFile` answers (`src/lib/server/services/quality.ts`). */
export const UploadedFileSchema = z.object({
  id: z.number(),
  mime: z.enum(['image/png', 'image/jpeg', 'application/pdf', 'text/csv', 'text/plain']),
  sha256: z.string(),
  sizeBytes: z.number(),
  filename: z.string(),
});

export const SpcLimitsSchema = z.object({
  center: z.number(),
  ucl: z.number(),
  lcl: z.number(),
});

export const SpcIntervalSchema = z.object({
  lower: z.number(),
  upper: z.number(),
  confidence: z.number(),
});

export const SpcPpmSchema = z.object({
  belowLsl: z.number().nullable(),
  aboveUsl: z.number().nullable(),
  total: z.number(),
});

/** What `adhesionPChart` answers (`src/lib/server/services/quality.ts`). */
export const AdhesionChartSchema = z.object({
  weeks: z.array(
    z.object({
      week: z.string(),
      startMs: z.number(),
      tests: z.number(),
      failed: z.number(),
    }),
  ),
  evaluation: z
    .object({
      chart: z.enum(['xbar-r', 'xbar-s', 'imr', 'ewma', 'cusum', 'p', 'np', 'c', 'u']),
      limits: SpcLimitsSchema,
      dispersion: SpcLimitsSchema.nullable(),
      sigmaWithin: z.number().nullable(),
      points: z.array(
        z.object({
          index: z.number(),
          value: z.number(),
          center: z.number(),
          ucl: z.number(),
          lcl: z.number(),
          dispersionValue: z.number().nullable(),
          violations: z.array(
            z.enum([
              'we1',
              'we2',
              'we3',
              'we4',
              'nelson1',
              'nelson2',
              'nelson3',
              'nelson4',
              'nelson5',
              'nelson6',
              'nelson7',
              'nelson8',
              'dispersion-ucl',
              'dispersion-lcl',
              'ewma-upper',
              'ewma-lower',
              'cusum-upper',
              'cusum-lower',
            ]),
          ),
          inPhase1: z.boolean(),
          size: z.number(),
          observation: z.number().optional(),
          cPlus: z.number().optional(),
          cMinus: z.number().optional(),
          nPlus: z.number().optional(),
          nMinus: z.number().optional(),
          shiftEstimate: z.number().nullable().optional(),
        }),
      ),
      capability: z
        .object({
          lsl: z.number().nullable(),
          usl: z.number().nullable(),
          target: z.number().nullable(),
          n: z.number(),
          mean: z.number(),
          sigmaWithin: z.number(),
          sigmaOverall: z.number(),
          cp: z.number().nullable(),
          cpk: z.number().nullable(),
          cpu: z.number().nullable(),
          cpl: z.number().nullable(),
          pp: z.number().nullable(),
          ppk: z.number().nullable(),
          ppu: z.number().nullable(),
          ppl: z.number().nullable(),
          cpm: z.number().nullable(),
          cpInterval: SpcIntervalSchema.nullable(),
          cpkInterval: SpcIntervalSchema.nullable(),
          ppmWithin: SpcPpmSchema.nullable(),
          ppmOverall: SpcPpmSchema.nullable(),
          normality: z
            .object({
              method: z.literal('anderson-darling'),
              n: z.number(),
              a2: z.number(),
              a2Adjusted: z.number(),
              pValue: z.number(),
              normalAt5Percent: z.boolean(),
            })
            .nullable(),
          autocorrelation: z
            .object({
              n: z.number(),
              lag1: z.number(),
              threshold: z.number(),
              warning: z.string().nullable(),
            })
            .nullable(),
        })
        .nullable(),
      phase1: z
        .object({
          first: z.number(),
          last: z.number(),
          suggestedExclusions: z.array(
            z.object({
              index: z.number(),
              iteration: z.number(),
              reason: z.string(),
            }),
          ),
        })
        .nullable(),
      parameters: z.object({
        center: z.number(),
        sigma: z.number().nullable(),
        centerSource: z.enum(['given', 'phase1']),
        sigmaSource: z.enum(['given', 'phase1']).nullable(),
        subgroupSize: z.number(),
        lambda: z.number().optional(),
        L: z.number().optional(),
        ewmaLimits: z.enum(['exact', 'asymptotic']).optional(),
        k: z.number().optional(),
        h: z.number().optional(),
        K: z.number().optional(),
        H: z.number().optional(),
        headStart: z.number().optional(),
      }),
      rules: z.array(
        z.enum([
          'we1',
          'we2',
          'we3',
          'we4',
          'nelson1',
          'nelson2',
          'nelson3',
          'nelson4',
          'nelson5',
          'nelson6',
          'nelson7',
          'nelson8',
        ]),
      ),
      notes: z.array(z.string()),
    })
    .nullable(),
  message: z.string().nullable(),
});

/** What `failuresByOven` (one element) answers (`src/lib/server/services/quality.ts`). */
export const FailureGroupSchema = z.object({
  key: z.string(),
  label: z.string(),
  tests: z.number(),
  failed: z.number(),
  href: z.string().nullable(),
});

export const RangeSchema = z.object({
  min: z.number(),
  max: z.number(),
  target: z.number().optional(),
});

/** What `traceJob` answers (`src/lib/server/services/trace.ts`). */
export const TraceSchema = z.object({
  job: z.object({
    id: z.number(),
    jobNumber: z.string(),
    customerRef: z.string().nullable(),
    lensMaterial: z.string().nullable(),
    status: z.string(),
    activeHold: z
      .object({
        id: z.number(),
        reason: z.string(),
        placedAt: z.string(),
        placedBy: z.string().nullable(),
      })
      .nullable(),
  }),
  dipRuns: z.array(
    z.object({
      id: z.number(),
      dippedAt: z.string(),
      line: z.object({
        id: z.number(),
        code: z.string(),
        name: z.string(),
      }),
      tank: z
        .object({
          id: z.number(),
          code: z.string(),
          name: z.string(),
        })
        .nullable(),
      rackCode: z.string().nullable(),
      withdrawalSpeedMmS: z.number().nullable(),
      strokeSamples: z.number().nullable(),
      speedWindow: RangeSchema.nullable(),
      window: z
        .object({
          id: z.number(),
          name: z.string(),
          version: z.number(),
        })
        .nullable(),
      bath: z.object({
        charge: z
          .object({
            id: z.number(),
            chargedAt: z.string(),
            lotCode: z.string(),
            lacquer: z.string(),
            lotExpiresOn: z.string(),
            potLifeDays: z.number(),
            age: z
              .object({
                ageDays: z.number(),
                potLifeFractionUsed: z.number(),
                status: z.enum(['ok', 'near-end', 'expired']),
              })
              .nullable(),
          })
          .nullable(),
        lastCheck: z
          .object({
            id: z.number(),
            at: z.string(),
            minutesBeforeDip: z.number(),
            kinematicMm2S: z.number(),
            method: z.string(),
            cup: z.string().nullable(),
            effluxSeconds: z.number().nullable(),
            bathTempC: z.number().nullable(),
            solidsPct: z.number().nullable(),
            by: z.string(),
          })
          .nullable(),
        sensorViscosityMm2S: z.number().nullable(),
        viscosityWindow: RangeSchema.nullable(),
        viscosityStatus: z.enum(['high', 'low', 'unknown', 'in']),
      }),
      jobsInRun: z.number(),
    }),
  ),
  loads: z.array(
    z.object({
      id: z.number(),
      oven: z.object({
        id: z.number(),
        code: z.string(),
        name: z.string(),
      }),
      openedAt: z.string(),
      closedAt: z.string().nullable(),
      status: z.enum(['open', 'closed']),
      verdict: z.enum(['complete', 'under-cured', 'over-temperature', 'unverifiable']).nullable(),
      record: z
        .object({
          window: z
            .object({
              id: z.number(),
              version: z.number(),
              name: z.string(),
              lacquer: z.string(),
              substrate: z.string(),
              minTempC: z.number(),
              minEquivalentMinutes: z.number(),
              referenceC: z.number(),
              activationEnergyKJMol: z.number(),
              maxPartTempC: z.number(),
              maxRampCPerMin: z.number(),
              maxGapSeconds: z.number(),
              defaulted: z.array(z.string()),
            })
            .nullable(),
          source: z.object({
            zoneChannels: z.array(
              z.object({
                id: z.number(),
                name: z.string(),
              }),
            ),
            doorChannelId: z.number().nullable(),
            readings: z.number(),
            instants: z.number(),
            badQualityExcluded: z.number(),
          }),
          openedAtMs: z.number(),
          closedAtMs: z.number(),
          durationMinutes: z.number(),
          minutesAtOrAboveMin: z.number().nullable(),
          peakC: z.number().nullable(),
          peakAtMs: z.number().nullable(),
          maxHeatUpCPerMin: z.number().nullable(),
          maxCoolDownCPerMin: z.number().nullable(),
          rampExceeded: z.boolean(),
          equivalentMinutes: z.number().nullable(),
          gaps: z.array(
            z.object({
              startMs: z.number(),
              endMs: z.number(),
              durationS: z.number(),
            }),
          ),
          soak: z
            .object({
              startMs: z.number(),
              endMs: z.number(),
            })
            .nullable(),
          door: z.object({
            openings: z.number(),
            openSeconds: z.number(),
            openingsDuringSoak: z.number(),
            events: z.array(
              z.object({
                openedMs: z.number(),
                closedMs: z.number(),
                durationS: z.number(),
                stillOpen: z.boolean(),
              }),
            ),
          }),
          verdict: z.enum(['complete', 'under-cured', 'over-temperature', 'unverifiable']),
          reasons: z.array(z.string()),
          computedAtMs: z.number(),
        })
        .nullable(),
      alarms: z.array(
        z.object({
          id: z.number(),
          priority: z.string(),
          state: z.string(),
          sourceLabel: z.string(),
          message: z.string(),
          raisedAt: z.string(),
          clearedAt: z.string().nullable(),
          ackedBy: z.string().nullable(),
        }),
      ),
      jobsInLoad: z.number(),
    }),
  ),
  tests: z.array(
    z.object({
      id: z.number(),
      kind: z.enum(['crosscut', 'boil', 'abrasion', 'thickness', 'cosmetic']),
      result: z.enum(['pass', 'fail']),
      testedAt: z.string(),
      testedBy: z.string(),
      summary: z.string(),
      boilCycles: z.number().nullable(),
      files: z.number(),
    }),
  ),
  siblings: z.array(
    z.object({
      jobNumber: z.string(),
      status: z.string(),
      sameLoads: z.array(z.number()),
      sameBathRuns: z.array(
        z.object({
          dipRunId: z.number(),
          dippedAt: z.string(),
          hoursApart: z.number(),
        }),
      ),
      tests: z.number(),
      failed: z.number(),
      lastTest: z
        .object({
          kind: z.enum(['crosscut', 'boil', 'abrasion', 'thickness', 'cosmetic']),
          result: z.enum(['pass', 'fail']),
          testedAt: z.string(),
        })
        .nullable(),
      activeHoldId: z.number().nullable(),
    }),
  ),
  siblingWindowHours: z.number(),
});

export const SignatureSchema = z.object({
  userId: z.number(),
  username: z.string(),
  displayName: z.string(),
  meaning: z.string(),
  signedAt: z.string(),
});

/** What `closeHolds` (one element) answers (`src/lib/server/services/holds.ts`). */
export const HoldItemSchema = z.object({
  id: z.number(),
  jobNumber: z.string(),
  jobStatus: z.string(),
  reason: z.string(),
  placedAt: z.string(),
  placedBy: z.string().nullable(),
  status: z.enum(['closed', 'active']),
  disposition: z.enum(['release', 'recoat', 'scrap', 'use-as-is']).nullable(),
  dispositionComment: z.string().nullable(),
  closedAt: z.string().nullable(),
  closedBy: z.string().nullable(),
  signature: SignatureSchema.nullable(),
  ncId: z.number().nullable(),
  ncTitle: z.string().nullable(),
});

/** What `placeHolds` answers (`src/lib/server/services/holds.ts`). */
export const PlacedHoldsSchema = z.object({
  placed: z.array(
    z.object({
      holdId: z.number(),
      jobNumber: z.string(),
    }),
  ),
  alreadyHeld: z.array(z.string()),
});

/** What `listNcs` (one element) answers (`src/lib/server/services/holds.ts`). */
export const NcItemSchema = z.object({
  id: z.number(),
  title: z.string(),
  description: z.string(),
  suspectedCause: z.string(),
  suspectedLoadId: z.number().nullable(),
  suspectedBathChargeId: z.number().nullable(),
  status: z.enum(['open', 'closed']),
  openedAt: z.string(),
  openedBy: z.string().nullable(),
  closedAt: z.string().nullable(),
  closedBy: z.string().nullable(),
  closeSignature: SignatureSchema.nullable(),
  tests: z.number(),
  activeHolds: z.number(),
  holds: z.number(),
});

/** What `getNc` answers (`src/lib/server/services/holds.ts`). */
export const NcDetailSchema = z.object({
  testList: z.array(
    z.object({
      id: z.number(),
      jobNumber: z.string(),
      kind: z.string(),
      result: z.string(),
      testedAt: z.string(),
      summary: z.string(),
    }),
  ),
  holdList: z.array(HoldItemSchema),
  dispositions: z.array(
    z.object({
      id: z.number(),
      disposition: z.enum(['release', 'recoat', 'scrap', 'use-as-is']),
      jobNumbers: z.array(z.string()),
      comment: z.string(),
      signature: SignatureSchema,
      at: z.string(),
    }),
  ),
  load: z
    .object({
      id: z.number(),
      ovenName: z.string(),
      openedAt: z.string(),
      verdict: z.string().nullable(),
    })
    .nullable(),
  bathCharge: z
    .object({
      id: z.number(),
      tankCode: z.string(),
      lotCode: z.string(),
      chargedAt: z.string(),
    })
    .nullable(),
  id: z.number(),
  title: z.string(),
  description: z.string(),
  suspectedCause: z.string(),
  suspectedLoadId: z.number().nullable(),
  suspectedBathChargeId: z.number().nullable(),
  status: z.enum(['open', 'closed']),
  openedAt: z.string(),
  openedBy: z.string().nullable(),
  closedAt: z.string().nullable(),
  closedBy: z.string().nullable(),
  closeSignature: SignatureSchema.nullable(),
  tests: z.number(),
  activeHolds: z.number(),
  holds: z.number(),
});

/** What `dispositionNc` answers (`src/lib/server/services/holds.ts`). */
export const NcDispositionedSchema = NcDetailSchema;

/** What `closeNc` answers (`src/lib/server/services/holds.ts`). */
export const NcClosedSchema = NcDetailSchema;

export const TestListSchema = z.array(TestListItemSchema);
/** `GET /api/v1/quality/adhesion`: the weekly p chart and the failures by oven and by bath charge. */
export const AdhesionSchema = z.object({
  chart: AdhesionChartSchema,
  byOven: z.array(FailureGroupSchema),
  byBathCharge: z.array(FailureGroupSchema),
});
export const HoldListSchema = z.array(HoldItemSchema);
export const NcListSchema = z.array(NcItemSchema);
