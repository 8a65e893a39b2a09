import { z } from 'zod';

/** How bad it is when a rule is broken. A finding may also be 'pass'. */
export const ruleSeveritySchema = z.enum(['failure', 'warning']);

const severity = { severity: ruleSeveritySchema };
const finite = () => z.number().finite();
const seconds = () => z.number().finite().nonnegative();

function hasBound(rule: { minSeconds?: number; maxSeconds?: number }): boolean {
  return rule.minSeconds !== undefined || rule.maxSeconds !== undefined;
}
function boundsInOrder(rule: { minSeconds?: number; maxSeconds?: number }): boolean {
  return (
    rule.minSeconds === undefined ||
    rule.maxSeconds === undefined ||
    rule.minSeconds <= rule.maxSeconds
  );
}

const secondsRangeSchema = z
  .strictObject({ ...severity, minSeconds: seconds().optional(), maxSeconds: seconds().optional() })
  .refine(hasBound, { message: 'Give a minimum, a maximum or both.' })
  .refine(boundsInOrder, { message: 'The minimum must not exceed the maximum.' });

const vinylFormatSchema = z.enum(['12-33', '12-45', '7-45']);

/**
 * Every rule a delivery profile can set. Each is optional and carries its own severity.
 * Levels are dBFS / dBTP / LUFS, ranges LU, times seconds, as the field names say.
 */
export const deliveryRulesSchema = z.strictObject({
  /** Container (lower case, as the audio engine reports it) and sample encoding. */
  container: z
    .strictObject({
      ...severity,
      allowed: z.array(z.string().min(1)).min(1),
      encodings: z
        .array(z.enum(['pcm-int', 'pcm-float']))
        .min(1)
        .optional(),
    })
    .optional(),
  sampleRate: z
    .strictObject({ ...severity, allowedHz: z.array(z.number().int().positive()).min(1) })
    .optional(),
  /** Bits per sample as stored. */
  bitDepth: z
    .strictObject({ ...severity, allowedBits: z.array(z.number().int().positive()).min(1) })
    .optional(),
  /** Bits that actually vary, lowest channel: catches 16-bit audio padded to 24. */
  effectiveBitDepth: z
    .strictObject({ ...severity, minBits: z.number().int().positive() })
    .optional(),
  channelCount: z
    .strictObject({ ...severity, allowed: z.array(z.number().int().positive()).min(1) })
    .optional(),
  samplePeak: z.strictObject({ ...severity, ceilingDbfs: finite() }).optional(),
  truePeak: z.strictObject({ ...severity, ceilingDbtp: finite() }).optional(),
  /** Either target ± tolerance, or min/max, or both. */
  integratedLoudness: z
    .strictObject({
      ...severity,
      targetLufs: finite().optional(),
      toleranceLu: z.number().finite().nonnegative().optional(),
      minLufs: finite().optional(),
      maxLufs: finite().optional(),
    })
    .refine(
      (r) =>
        (r.targetLufs !== undefined && r.toleranceLu !== undefined) ||
        (r.targetLufs === undefined &&
          r.toleranceLu === undefined &&
          (r.minLufs !== undefined || r.maxLufs !== undefined)),
      { message: 'Give a target with a tolerance, or a minimum and/or maximum.' },
    )
    .optional(),
  loudnessRange: z
    .strictObject({
      ...severity,
      minLu: z.number().finite().nonnegative().optional(),
      maxLu: z.number().finite().nonnegative().optional(),
    })
    .refine((r) => r.minLu !== undefined || r.maxLu !== undefined, {
      message: 'Give a minimum, a maximum or both.',
    })
    .refine((r) => r.minLu === undefined || r.maxLu === undefined || r.minLu <= r.maxLu, {
      message: 'The minimum must not exceed the maximum.',
    })
    .optional(),
  shortTermLoudness: z.strictObject({ ...severity, maxLufs: finite() }).optional(),
  /** Largest allowed mean sample value per channel, percent of full scale. */
  dcOffset: z
    .strictObject({ ...severity, maxPercent: z.number().finite().nonnegative() })
    .optional(),
  /** A run of this many consecutive full-scale samples or more counts as clipping. */
  clipping: z.strictObject({ ...severity, minRunSamples: z.number().int().positive() }).optional(),
  headSilence: secondsRangeSchema.optional(),
  tailSilence: secondsRangeSchema.optional(),
  /** First sample above this level is an abrupt start (a click on play). */
  abruptStart: z.strictObject({ ...severity, maxLevelDbfs: finite() }).optional(),
  abruptEnd: z.strictObject({ ...severity, maxLevelDbfs: finite() }).optional(),
  identicalChannels: z.strictObject({ ...severity }).optional(),
  invertedChannels: z.strictObject({ ...severity }).optional(),
  /** Low-band correlation floor; `warnBelow` adds an earlier warning above the floor. */
  lowFrequencyCorrelation: z
    .strictObject({
      ...severity,
      minCorrelation: z.number().min(-1).max(1),
      warnBelow: z.number().min(-1).max(1).optional(),
    })
    .optional(),
  trackDuration: secondsRangeSchema.optional(),
  /** Per disc (tracks grouped by disc number). */
  trackCount: z.strictObject({ ...severity, max: z.number().int().positive() }).optional(),
  /**
   * Total running time, gaps included, per disc, per vinyl side or for the whole release.
   * `warnAboveSeconds` adds an earlier warning below the maximum; `vinylFormat` adds the
   * level-versus-time guidance for that disc to the message.
   */
  runningTime: z
    .strictObject({
      ...severity,
      scope: z.enum(['release', 'disc', 'side']),
      maxSeconds: seconds(),
      warnAboveSeconds: seconds().optional(),
      vinylFormat: vinylFormatSchema.optional(),
    })
    .optional(),
  /** Gap before the first track of each disc (the CD pre-gap). */
  firstTrackPreGap: secondsRangeSchema.optional(),
  /** Gap before every other track. */
  gapBetweenTracks: secondsRangeSchema.optional(),
  /** Gaps must be whole CD frames (1/75 s). */
  gapWholeCdFrames: z.strictObject({ ...severity }).optional(),
  /** Audio length must be whole CD frames (588 samples at 44.1 kHz). */
  lengthWholeCdFrames: z.strictObject({ ...severity }).optional(),
  /**
   * Where the declared gap is 0: no click (the level step from the previous file's last
   * sample to this file's first sample, per channel, above `maxStepDbfs`) and no fade to
   * silence (tail or head silence longer than `maxSilenceSeconds`).
   */
  gaplessJoin: z
    .strictObject({ ...severity, maxStepDbfs: finite(), maxSilenceSeconds: seconds() })
    .optional(),
  /** Where the declared gap is above 0: silence inside the files at the join adds to it. */
  gapDoubledBySilence: z.strictObject({ ...severity, maxSilenceSeconds: seconds() }).optional(),
  isrcPresent: z.strictObject({ ...severity }).optional(),
  isrcValid: z.strictObject({ ...severity }).optional(),
  /** No two tracks of the release share an ISRC. */
  isrcUniqueInRelease: z.strictObject({ ...severity }).optional(),
  /** The ISRC is not used by a different recording elsewhere in the label. */
  isrcConsistentInLabel: z.strictObject({ ...severity }).optional(),
  /** UPC-A or EAN-13 present with a correct GS1 check digit. */
  barcode: z.strictObject({ ...severity }).optional(),
  requiredCredits: z
    .strictObject({ ...severity, roles: z.array(z.string().min(1)).min(1) })
    .optional(),
  artwork: z
    .strictObject({
      ...severity,
      minWidthPx: z.number().int().positive(),
      minHeightPx: z.number().int().positive(),
      formats: z.array(z.string().min(1)).min(1),
      square: z.boolean(),
    })
    .optional(),
});

/** A delivery profile: the technical and metadata specification of one outlet. */
export const deliveryProfileSchema = z.strictObject({
  /** Stable, kebab-case ("cd-master"); findings and waivers refer to it. */
  id: z.string().regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'Use lower-case letters, digits and hyphens.'),
  name: z.string().min(1).max(120),
  description: z.string().max(2000),
  /** Bumped on every change, so a check result can name the profile version it used. */
  version: z.number().int().positive(),
  rules: deliveryRulesSchema,
});

export type RuleSeverity = z.infer<typeof ruleSeveritySchema>;
export type DeliveryRules = z.infer<typeof deliveryRulesSchema>;
export type DeliveryProfile = z.infer<typeof deliveryProfileSchema>;
export type RuleId = keyof DeliveryRules;
export type VinylFormat = z.infer<typeof vinylFormatSchema>;
