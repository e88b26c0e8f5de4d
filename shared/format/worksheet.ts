/**
 * The Spreadproof worksheet document, format "spreadproof.worksheet", version 1.
 *
 * One zod schema defines the document; the TypeScript types are inferred from it and the
 * JSON Schema in `worksheet.schema.json` is generated from it (`npx tsx shared/format/export-schema.ts`).
 *
 * The schema checks structure and types only. Ranges and cross-references (a confidence level in
 * (0, 1), sigma0 > 0, a column that exists in the referenced step) are checked by the engine per
 * step, so that one bad step yields a typed error on that step while the other steps still evaluate.
 */
import { z } from 'zod';

export const WORKSHEET_FORMAT = 'spreadproof.worksheet';
export const WORKSHEET_FORMAT_VERSION = 1;

/** Stable step identifier: referenced by other steps and by revision comparison. */
export const StepIdSchema = z
  .string()
  .regex(/^[A-Za-z][A-Za-z0-9_-]{0,63}$/, 'a step id starts with a letter and has at most 64 letters, digits, "-" or "_"')
  .meta({ description: 'Stable identifier of the step, unique within the worksheet.' });

const ColumnName = z.string().min(1).max(200);
const Unit = z.string().max(40).meta({ description: 'Unit of the measurements, e.g. "um", "mm", "N".' });
const Level = z.number().meta({ description: 'Confidence level, strictly between 0 and 1 (e.g. 0.95).' });
const Alpha = z.number().meta({ description: 'Significance level, strictly between 0 and 1 (e.g. 0.05).' });

// ---------------------------------------------------------------------------------------------
// Data
// ---------------------------------------------------------------------------------------------

export const NumberColumnSchema = z.strictObject({
  name: ColumnName,
  type: z.literal('number'),
  unit: Unit.optional(),
  values: z
    .array(z.union([z.number(), z.string(), z.null()]))
    .meta({ description: 'Cell values. null is a blank cell; a string that is not a number is a skipped cell.' }),
});

export const TextColumnSchema = z.strictObject({
  name: ColumnName,
  type: z.literal('text'),
  values: z.array(z.union([z.string(), z.null()])),
});

export const InlineColumnSchema = z.discriminatedUnion('type', [NumberColumnSchema, TextColumnSchema]);

export const SummaryStatisticsSchema = z.strictObject({
  label: z.string().max(200).optional().meta({ description: 'Name of the group these statistics describe.' }),
  n: z.int().meta({ description: 'Number of observations (at least 2).' }),
  mean: z.number().optional().meta({ description: 'Sample mean (needed for capability and ANOVA).' }),
  s: z.number().meta({ description: 'Sample standard deviation with divisor n - 1.' }),
}).meta({ id: 'SummaryStatistics' });

export const DatasetColumnMetaSchema = z.strictObject({
  name: ColumnName,
  unit: Unit.optional(),
});

export const InlineDataSchema = z.strictObject({
  origin: z.literal('inline'),
  columns: z.array(InlineColumnSchema).min(1),
});

export const DatasetDataSchema = z.strictObject({
  origin: z.literal('dataset'),
  datasetId: z
    .string()
    .regex(/^[0-9a-f]{64}$/, 'a dataset id is the SHA-256 of its bytes, 64 lower-case hex digits')
    .meta({ description: 'SHA-256 (hex) of the uploaded file; the bytes are passed to evaluate() as datasets[datasetId].' }),
  fileName: z.string().max(260).optional(),
  columns: z
    .array(DatasetColumnMetaSchema)
    .optional()
    .meta({ description: 'Units of the dataset columns, by column name.' }),
});

export const SummaryDataSchema = z.strictObject({
  origin: z.literal('summary'),
  unit: Unit.optional(),
  groups: z.array(SummaryStatisticsSchema).min(1),
});

export const DataParamsSchema = z.discriminatedUnion('origin', [InlineDataSchema, DatasetDataSchema, SummaryDataSchema]);

// ---------------------------------------------------------------------------------------------
// Where an analysis step takes its sample(s) from
// ---------------------------------------------------------------------------------------------

/** Raw values from a column of an earlier data or derived-column step, optionally split by a group column. */
export const StepSourceSchema = z.strictObject({
  step: StepIdSchema.meta({ description: 'Id of an earlier data or derived-column step.' }),
  column: ColumnName.optional().meta({ description: 'Numeric column holding the measurements (omit for a summary data step).' }),
  groupBy: ColumnName.optional().meta({ description: 'Column whose values split the measurements into groups.' }),
  groups: z
    .array(z.string())
    .optional()
    .meta({ description: 'Groups to use, in this order (default: all, in order of first appearance).' }),
});

/** Summary statistics written into the step itself (one object, or one per group). */
export const InlineSummarySourceSchema = z.strictObject({
  summary: z.union([SummaryStatisticsSchema, z.array(SummaryStatisticsSchema).min(1)]),
  unit: Unit.optional(),
});

export const SourceSchema = z.union([StepSourceSchema, InlineSummarySourceSchema]).meta({ id: 'Source' });

// ---------------------------------------------------------------------------------------------
// Step parameters
// ---------------------------------------------------------------------------------------------

const Sides = z.enum(['two-sided', 'lower', 'upper']).meta({
  description: '"two-sided": equal-tail interval; "lower": one-sided lower confidence bound; "upper": one-sided upper confidence bound.',
});
const Alternative = z.enum(['two-sided', 'greater', 'less']);

export const DerivedColumnParamsSchema = z.strictObject({
  step: StepIdSchema.meta({ description: 'Id of the earlier data or derived-column step whose columns the expression uses.' }),
  name: ColumnName.meta({ description: 'Name of the new column.' }),
  expression: z.string().max(2000).meta({ description: 'math.js expression over the columns, e.g. "diameter * 1000".' }),
  unit: Unit.optional(),
});

export const SpreadSummaryParamsSchema = z.strictObject({
  source: SourceSchema,
});

export const SigmaIntervalParamsSchema = z.strictObject({
  source: SourceSchema,
  levels: z.array(Level).min(1).max(12).meta({ description: 'One or more confidence levels, shown side by side.' }),
  sides: Sides.default('two-sided'),
  methods: z
    .array(z.enum(['chi-square', 'bonett']))
    .min(1)
    .default(['chi-square', 'bonett'])
    .meta({ description: 'chi-square (assumes normality) and/or Bonett (2006, robust to non-normal kurtosis; needs raw data).' }),
});

export const TargetTestParamsSchema = z.strictObject({
  source: SourceSchema,
  sigma0: z.number().meta({ description: 'Required (hypothesised) standard deviation, in the unit of the data; > 0.' }),
  alternative: Alternative.default('two-sided').meta({
    description: '"greater": H1 sigma > sigma0; "less": H1 sigma < sigma0; "two-sided": H1 sigma != sigma0.',
  }),
  alpha: Alpha.default(0.05),
});

export const TwoSampleRatioParamsSchema = z.strictObject({
  source: SourceSchema.meta({ description: 'Exactly two groups (first / second).' }),
  ratio0: z.number().default(1).meta({ description: 'Hypothesised ratio of variances sigma1^2 / sigma2^2; > 0.' }),
  alternative: Alternative.default('two-sided'),
  alpha: Alpha.default(0.05),
  level: Level.default(0.95),
});

export const GroupComparisonParamsSchema = z.strictObject({
  source: SourceSchema.meta({ description: 'Two or more groups.' }),
  alpha: Alpha.default(0.05),
});

export const NormalityCheckParamsSchema = z.strictObject({
  source: SourceSchema,
  alpha: Alpha.default(0.05),
});

export const SampleSizeGoalSchema = z.discriminatedUnion('goal', [
  z.strictObject({
    goal: z.literal('interval-ratio'),
    level: Level.default(0.95),
    ratio: z.number().meta({ description: 'Largest acceptable ratio upper / lower of the two-sided interval; > 1.' }),
    scale: z.enum(['sigma', 'variance']).default('sigma'),
  }),
  z.strictObject({
    goal: z.literal('relative-precision'),
    level: Level.default(0.95),
    percent: z.number().meta({ description: 'd: know sigma within plus or minus d percent (0 < d < 100).' }),
    criterion: z.enum(['exact', 'greenwood-sandomire']).default('exact').meta({
      description:
        '"exact": smallest n with P(|s/sigma - 1| < d) >= level (chi-square distribution of s); "greenwood-sandomire": n = (z/d)^2 / 2 rounded (normal approximation of s, the tabulated values).',
    }),
  }),
  z.strictObject({
    goal: z.literal('chi-square-power'),
    alpha: Alpha.default(0.05),
    alternative: Alternative.default('greater'),
    ratio: z.number().meta({ description: 'True sigma / sigma0 to detect; > 0, not 1.' }),
    n: z.int().optional().meta({ description: 'Sample size whose power is wanted.' }),
    power: z.number().optional().meta({ description: 'Required power; the plan finds the smallest n.' }),
  }),
  z.strictObject({
    goal: z.literal('f-power'),
    alpha: Alpha.default(0.05),
    alternative: Alternative.default('greater'),
    ratio: z.number().meta({ description: 'True sigma1 / sigma2 to detect; > 0, not 1.' }),
    n: z.int().optional().meta({ description: 'Sample size per group whose power is wanted.' }),
    power: z.number().optional().meta({ description: 'Required power; the plan finds the smallest equal n per group.' }),
  }),
]);

export const SampleSizePlanParamsSchema = z.strictObject({
  plan: SampleSizeGoalSchema,
});

export const ToleranceSpecSchema = z.strictObject({
  coverage: z.number().meta({ description: 'Proportion of the population to cover, in (0, 1), e.g. 0.99.' }),
  confidence: z.number().meta({ description: 'Confidence level, in (0, 1), e.g. 0.95.' }),
  sides: z.enum(['two-sided', 'lower', 'upper']).default('two-sided'),
});

export const CapabilityParamsSchema = z.strictObject({
  source: SourceSchema,
  lsl: z.number().optional().meta({ description: 'Lower specification limit.' }),
  usl: z.number().optional().meta({ description: 'Upper specification limit.' }),
  level: Level.default(0.95).meta({ description: 'Confidence level of the Cp and Cpk bounds.' }),
  tolerance: ToleranceSpecSchema.optional(),
});

export const NoteParamsSchema = z.strictObject({
  markdown: z.string().max(100_000),
});

// ---------------------------------------------------------------------------------------------
// Steps and document
// ---------------------------------------------------------------------------------------------

const stepBase = {
  id: StepIdSchema,
  title: z.string().max(200).optional().meta({ description: 'Heading shown above the step.' }),
};

export const DataStepSchema = z.strictObject({ ...stepBase, kind: z.literal('data'), params: DataParamsSchema }).meta({ id: 'DataStep' });
export const DerivedColumnStepSchema = z.strictObject({ ...stepBase, kind: z.literal('derived-column'), params: DerivedColumnParamsSchema }).meta({ id: 'DerivedColumnStep' });
export const SpreadSummaryStepSchema = z.strictObject({ ...stepBase, kind: z.literal('spread-summary'), params: SpreadSummaryParamsSchema }).meta({ id: 'SpreadSummaryStep' });
export const SigmaIntervalStepSchema = z.strictObject({ ...stepBase, kind: z.literal('sigma-interval'), params: SigmaIntervalParamsSchema }).meta({ id: 'SigmaIntervalStep' });
export const TargetTestStepSchema = z.strictObject({ ...stepBase, kind: z.literal('target-test'), params: TargetTestParamsSchema }).meta({ id: 'TargetTestStep' });
export const TwoSampleRatioStepSchema = z.strictObject({ ...stepBase, kind: z.literal('two-sample-ratio'), params: TwoSampleRatioParamsSchema }).meta({ id: 'TwoSampleRatioStep' });
export const GroupComparisonStepSchema = z.strictObject({ ...stepBase, kind: z.literal('group-comparison'), params: GroupComparisonParamsSchema }).meta({ id: 'GroupComparisonStep' });
export const NormalityCheckStepSchema = z.strictObject({ ...stepBase, kind: z.literal('normality-check'), params: NormalityCheckParamsSchema }).meta({ id: 'NormalityCheckStep' });
export const SampleSizePlanStepSchema = z.strictObject({ ...stepBase, kind: z.literal('sample-size-plan'), params: SampleSizePlanParamsSchema }).meta({ id: 'SampleSizePlanStep' });
export const CapabilityStepSchema = z.strictObject({ ...stepBase, kind: z.literal('capability'), params: CapabilityParamsSchema }).meta({ id: 'CapabilityStep' });
export const NoteStepSchema = z.strictObject({ ...stepBase, kind: z.literal('note'), params: NoteParamsSchema }).meta({ id: 'NoteStep' });

export const StepSchema = z.discriminatedUnion('kind', [
  DataStepSchema,
  DerivedColumnStepSchema,
  SpreadSummaryStepSchema,
  SigmaIntervalStepSchema,
  TargetTestStepSchema,
  TwoSampleRatioStepSchema,
  GroupComparisonStepSchema,
  NormalityCheckStepSchema,
  SampleSizePlanStepSchema,
  CapabilityStepSchema,
  NoteStepSchema,
]);

export const STEP_KINDS = [
  'data',
  'derived-column',
  'spread-summary',
  'sigma-interval',
  'target-test',
  'two-sample-ratio',
  'group-comparison',
  'normality-check',
  'sample-size-plan',
  'capability',
  'note',
] as const;

export const WorksheetSchema = z
  .strictObject({
    format: z.literal(WORKSHEET_FORMAT),
    version: z.literal(WORKSHEET_FORMAT_VERSION),
    title: z.string().min(1).max(200),
    description: z.string().max(10_000).optional(),
    display: z
      .strictObject({
        digits: z.int().min(2).max(15).default(4).meta({ description: 'Significant digits of displayed values.' }),
      })
      .optional(),
    steps: z.array(StepSchema).max(500),
  })
  .meta({
    title: 'Spreadproof worksheet',
    description: 'A versioned worksheet of variance, capability and normality steps, evaluated in order.',
  })
  .superRefine((doc, ctx) => {
    const seen = new Map<string, number>();
    doc.steps.forEach((step, index) => {
      const first = seen.get(step.id);
      if (first !== undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['steps', index, 'id'],
          message: `step id "${step.id}" is used by steps ${first + 1} and ${index + 1}; ids must be unique`,
        });
      } else {
        seen.set(step.id, index);
      }
    });
  });

/** A worksheet as written (defaults may be omitted). */
export type WorksheetInput = z.input<typeof WorksheetSchema>;
/** A validated worksheet with defaults filled in: what evaluate() works on. */
export type Worksheet = z.output<typeof WorksheetSchema>;
export type Step = Worksheet['steps'][number];
export type StepKind = Step['kind'];
export type StepOfKind<K extends StepKind> = Extract<Step, { kind: K }>;
export type Source = z.output<typeof SourceSchema>;
export type StepSource = z.output<typeof StepSourceSchema>;
export type InlineSummarySource = z.output<typeof InlineSummarySourceSchema>;
export type SummaryStatistics = z.output<typeof SummaryStatisticsSchema>;
export type DataParams = z.output<typeof DataParamsSchema>;
export type InlineColumn = z.output<typeof InlineColumnSchema>;
export type SampleSizeGoal = z.output<typeof SampleSizeGoalSchema>;

export interface FormatIssue {
  /** Path of the offending field, e.g. "steps.2.params.levels". */
  field: string;
  message: string;
}

export type ParseWorksheetResult =
  | { ok: true; worksheet: Worksheet }
  | { ok: false; issues: FormatIssue[] };

/** Validate an untrusted value (parsed JSON) as a worksheet; never throws. */
export function parseWorksheet(value: unknown): ParseWorksheetResult {
  const parsed = WorksheetSchema.safeParse(value);
  if (parsed.success) return { ok: true, worksheet: parsed.data };
  return {
    ok: false,
    issues: parsed.error.issues.map((issue) => ({
      field: issue.path.map(String).join('.') || '(document)',
      message: issue.message,
    })),
  };
}

/** The document's JSON Schema (draft 2020-12), generated from the zod schema. */
export function worksheetJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(WorksheetSchema, { io: 'input', unrepresentable: 'any' }) as Record<string, unknown>;
}
