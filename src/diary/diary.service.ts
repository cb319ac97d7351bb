import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError, BadRequestError, NotFoundError } from '../errors.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { FoodService } from '../foods/foods.service.js';
import { PatientService } from '../patients/patients.service.js';
import { settingsSource } from '../plans/plan-settings-source.js';
import { SwapService } from '../plans/swaps.service.js';
import type { SummarySettings } from '../plans/summary-types.js';
import { DiaryRepository } from './diary.repository.js';
import {
  buildDiaryReport,
  unsetTargets,
  type DiaryReport,
  type DiarySwap,
  type EntryMatchInput,
} from './findings.js';
import { memoryKey, prepareForScoring } from './matcher.js';
import { DiaryMatcher, type FoodFinder } from './matching.service.js';
import {
  MAX_SHARED_FOODS,
  nextTurn,
  SharedFoodRepository,
  sharedFoods,
  type SharedCache,
} from './shared-foods.js';
import { parseQuantity, type Quantity } from './quantity.js';
import {
  decodeDiaryBytes,
  entryKey,
  readDiary,
  type DiaryEntryInput,
  type DiaryFormat,
  type DiaryIssue,
} from './reader.js';

/** One installation serves one clinic; remembered matches are kept under this clinic key. */
export const CLINIC_KEY = 'default';
/** Swaps are looked up for the week's top phosphorus foods and the hidden-additive foods, at most this many foods. */
const SWAP_TOP_FOODS = 3;
const MAX_SWAP_FOODS = 6;
const SWAPS_PER_FOOD = 3;

export interface AuditInput {
  text?: string;
  bytes?: Uint8Array;
  format?: DiaryFormat | 'auto';
  dateOrder?: 'dmy' | 'mdy';
  patientId?: number | null;
  userId?: number | null;
}

export interface SavedAudit {
  id: number;
  patientId: number | null;
  createdAt: string;
  updatedAt: string;
  report: DiaryReport;
}

function readFailed(issues: DiaryIssue[]): never {
  const first = issues[0];
  const code = first?.code ?? 'PHL_DIARY_UNREADABLE';
  const status = code === 'PHL_DIARY_TOO_LARGE' ? 413 : 400;
  throw new AppError(
    code,
    status,
    issues.map((i) => (i.line > 0 ? `line ${i.line}: ${i.message}` : i.message)).join('; '),
    { issues },
  );
}

/**
 * The start-up warm-up's diary: invented demo lines (no patient's), one of each kind of line the
 * reader and matcher meet (headings, quantities in words, units, household measures, a brand).
 */
const WARM_UP_DIARY = `Monday
breakfast: 2 slices of whole wheat bread with butter
1 cup of 2% milk
lunch: chicken breast, roasted, 120 g
half a cup of white rice
snack: a can (355 ml) of cola
dinner: dos huevos fritos
processed cheese slice
Tuesday
breakfast - 1 bowl of oatmeal
lunch: ham sandwich
dinner: 150 g salmon, baked
`;

/**
 * The reviewer's choices, by entry key ("12", "12.1"): a food id (as saved before amounts could
 * be entered), or a food id with the amount the reviewer entered.
 */
export type EntryOverride = number | { foodId: number; quantity?: string };
export type Overrides = Readonly<Record<string, EntryOverride>>;

function overrideFood(o: EntryOverride | undefined): number | undefined {
  return o === undefined ? undefined : typeof o === 'number' ? o : o.foodId;
}

/** The amounts the reviewer entered, parsed (each was checked when it was entered). */
function enteredQuantities(overrides: Overrides): Map<string, Quantity> {
  const out = new Map<string, Quantity>();
  for (const [k, o] of Object.entries(overrides)) {
    if (typeof o !== 'object' || !o.quantity) continue;
    const q = parseQuantity(o.quantity);
    if (q.ok) out.set(k, q.value);
  }
  return out;
}

/** Passes over the warm-up diary: enough for V8 to optimise the scorer (measured, no source). */
const WARM_UP_PASSES = 3;

/** What one audit works with: the shared cache of the tables as they were when it started. */
interface AuditTools {
  foodRepo: SharedFoodRepository;
  foodService: FoodService;
  swaps: SwapService;
  /** Searches and swaps remembered: the shared ones, or the audit's own (the warm-up). */
  results: SharedCache['results'];
  swapMemo: SharedCache['swaps'];
  spelling: SharedCache['spelling'];
}

export class DiaryAuditService {
  private readonly repo: DiaryRepository;
  private readonly foodRepo: FoodRepository;
  private readonly patients: PatientService;
  private readonly settings: ReturnType<typeof settingsSource>;
  private readonly longRunning: boolean;

  /**
   * `longRunning`: a server, which keeps name indexes for its food tables (built by `prepare` at
   * start-up, or in the background after an import); otherwise (the CLI) SQL answers until some
   * caller prepares.
   */
  constructor(
    private readonly db: Db,
    private readonly clock: Clock,
    opts: { longRunning?: boolean } = {},
  ) {
    this.repo = new DiaryRepository(db.kysely);
    this.foodRepo = new FoodRepository(db.kysely);
    this.patients = new PatientService(db.kysely, clock);
    this.settings = settingsSource(db);
    this.longRunning = opts.longRunning ?? false;
  }

  /**
   * Builds what audits keep in memory for the current tables: the name indexes, and every generic
   * food loaded with its scoring features (when they fit the shared cache), then compiles the
   * scorer on an invented diary. The server runs it after listening and after each import; an
   * audit that comes before it has finished searches with SQL. Yields between steps.
   */
  async prepare(opts: { signal?: AbortSignal } = {}): Promise<{ indexed: number; foods: number }> {
    const stopped = () => opts.signal?.aborted === true;
    if (stopped()) return { indexed: 0, foods: 0 };
    const { foodRepo } = await this.tools();
    const [generic, branded] = await Promise.all([
      foodRepo.names('generic'),
      foodRepo.names('branded'),
    ]);
    // The spelling vocabulary (read from the FTS5 index) is built now, not by the first audit.
    await (await this.tools(true)).foodService.correctWords([]);
    let foods = 0;
    const ids = generic?.ids() ?? [];
    if (ids.length <= MAX_SHARED_FOODS) {
      for (let i = 0; i < ids.length; i += 500) {
        await nextTurn();
        if (stopped()) break;
        const loaded = await foodRepo.getFoods(ids.slice(i, i + 500));
        for (const f of loaded.values()) prepareForScoring(f);
        foods += loaded.size;
      }
    }
    // A short invented diary audited with its own memo (nothing shared is remembered from it):
    // the first real audit then runs compiled code, not the interpreter.
    const warm = readDiary(WARM_UP_DIARY);
    for (let pass = 0; pass < WARM_UP_PASSES && warm.ok; pass++) {
      await nextTurn();
      if (stopped()) break;
      await this.compute(warm.value.entries, {}, null, [], [], true);
    }
    return { indexed: (generic?.size ?? 0) + (branded?.size ?? 0), foods };
  }

  /** One audit's tools over one look at the shared cache (one stamp query per audit). */
  private async tools(scratch = false): Promise<AuditTools> {
    const shared = await sharedFoods(this.db);
    const foodRepo = new SharedFoodRepository(this.db, shared, this.longRunning);
    return {
      foodRepo,
      foodService: new FoodService(foodRepo),
      swaps: new SwapService(this.db.kysely, foodRepo, this.settings),
      results: scratch ? new Map() : shared.results,
      swapMemo: scratch ? new Map() : shared.swaps,
      spelling: scratch ? new Map() : shared.spelling,
    };
  }

  private finder(tools: AuditTools): FoodFinder {
    const { results, foodService, foodRepo } = tools;
    return {
      search: (q) => {
        const key = `${q.limit}|${q.q}`;
        let hit = results.get(key);
        if (!hit) {
          hit = foodService.search(q);
          results.set(key, hit);
          hit.catch(() => results.delete(key));
        }
        return hit;
      },
      findIdsByCode: (code) => foodRepo.findIdsByCode(code),
      getFoods: (ids) => foodRepo.getFoods(ids),
      correctWords: (words) => {
        const key = words.join(' ');
        let hit = tools.spelling.get(key);
        if (!hit) {
          hit = foodService.correctWords(words);
          tools.spelling.set(key, hit);
          hit.catch(() => tools.spelling.delete(key));
        }
        return hit;
      },
    };
  }

  private async summarySettings(): Promise<SummarySettings> {
    const [absorption, thresholds] = await Promise.all([
      this.settings.absorption(),
      this.settings.thresholds(),
    ]);
    return { absorption, thresholds };
  }

  /** Matches every entry: the dietitian's choice for the line first, then the matcher. */
  private async matchAll(
    entries: readonly DiaryEntryInput[],
    overrides: Overrides,
    tools: AuditTools,
  ): Promise<Map<string, EntryMatchInput>> {
    // One query for the clinic's remembered matches of every phrase in the diary.
    const remembered = await this.repo.lookupMemory(CLINIC_KEY, [
      ...new Set(entries.map((e) => memoryKey(e.foodText)).filter(Boolean)),
    ]);
    const matcher = new DiaryMatcher(this.finder(tools), {
      lookup: (keys) =>
        Promise.resolve(
          new Map(
            keys.flatMap((k) => (remembered.has(k) ? [[k, remembered.get(k) as number]] : [])),
          ),
        ),
    });
    const chosenIds = Object.values(overrides).map((o) => overrideFood(o) as number);
    const chosen = chosenIds.length > 0 ? await tools.foodRepo.getFoods(chosenIds) : new Map();
    const out = new Map<string, EntryMatchInput>();
    for (const e of entries) {
      const key = entryKey(e);
      const o = overrideFood(overrides[key]);
      const food = o === undefined ? undefined : chosen.get(o);
      if (food) {
        out.set(key, {
          food,
          method: 'confirmed',
          confidence: 1,
          candidates: [],
          notes: ['food chosen by the dietitian'],
        });
        continue;
      }
      out.set(key, await matcher.match({ foodText: e.foodText, barcode: e.barcode }));
    }
    return out;
  }

  private async swapsFor(
    report: ReturnType<typeof buildDiaryReport>,
    settings: SummarySettings,
    tools: AuditTools,
  ): Promise<DiaryReport> {
    const cache = tools.swapMemo;
    const settingsKey = JSON.stringify(settings);
    const swapOf = (foodId: number): Promise<DiarySwap | null> => {
      const key = `${foodId}|${settingsKey}`;
      let p = cache.get(key);
      if (!p) {
        p = tools.swaps.findSwaps(foodId, SWAPS_PER_FOOD).then(
          (r) => ({
            foodId: r.foodId,
            name: r.name,
            swaps: r.swaps.map((s) => ({
              foodId: s.foodId,
              name: s.name,
              shareOfOriginal: s.shareOfOriginal,
              additiveLikely: s.additiveLikely,
            })),
            rule: r.rule,
          }),
          (err: unknown) => {
            if (err instanceof NotFoundError) return null;
            throw err;
          },
        );
        cache.set(key, p);
        p.catch(() => cache.delete(key));
      }
      return p;
    };
    // Swaps for the week's biggest phosphorus sources and every hidden-additive food (bounded).
    const totals = new Map<number, number>();
    for (const e of report.entries) {
      if (e.match)
        totals.set(e.match.foodId, (totals.get(e.match.foodId) ?? 0) + (e.phosphorusMg ?? 0));
    }
    const top = [...totals.entries()]
      .sort((a, b) => b[1] - a[1])
      .slice(0, SWAP_TOP_FOODS)
      .map(([id]) => id);
    const hidden = report.entries
      .filter((e) => e.hidden && e.match)
      .map((e) => (e.match as { foodId: number }).foodId);
    const chosen = [...new Set([...top, ...hidden])].slice(0, MAX_SWAP_FOODS);
    const found = new Map<number, DiarySwap>();
    for (const id of chosen) {
      const sw = await swapOf(id);
      if (sw && sw.swaps.length > 0) found.set(id, sw);
    }
    const days = report.days.map((d) => {
      const present = new Set(
        report.entries
          .filter((e) => e.day === d.label && e.match)
          .map((e) => (e.match as { foodId: number }).foodId),
      );
      return {
        ...d,
        swaps: chosen
          .filter((id) => present.has(id) && found.has(id))
          .map((id) => found.get(id) as DiarySwap),
      };
    });
    return { ...report, days };
  }

  private async compute(
    entries: readonly DiaryEntryInput[],
    overrides: Overrides,
    patientId: number | null,
    skipped: readonly DiaryIssue[],
    notes: readonly DiaryIssue[],
    scratch = false,
  ): Promise<DiaryReport> {
    const targets = patientId === null ? unsetTargets() : await this.patients.targets(patientId);
    const tools = await this.tools(scratch);
    const [matches, settings] = await Promise.all([
      this.matchAll(entries, overrides, tools),
      this.summarySettings(),
    ]);
    const built = buildDiaryReport({
      entries,
      matches,
      quantities: enteredQuantities(overrides),
      settings,
      targets,
      targetsSource: patientId === null ? 'none' : 'patient',
      skipped,
      notes,
    });
    return this.swapsFor(built, settings, tools);
  }

  /** Reads, matches and reports a diary (nothing is saved). Bad files throw clear AppErrors. */
  async run(
    input: AuditInput,
  ): Promise<{ report: DiaryReport; entries: DiaryEntryInput[]; format: DiaryFormat }> {
    let text: string;
    const notes: DiaryIssue[] = [];
    if (input.bytes) {
      const decoded = decodeDiaryBytes(input.bytes);
      if (!decoded.ok) readFailed(decoded.issues);
      text = decoded.text;
      notes.push(...decoded.notes);
    } else if (typeof input.text === 'string') {
      text = input.text;
    } else {
      throw new BadRequestError('PHL_DIARY_EMPTY', 'the diary is empty');
    }
    const read = readDiary(text, {
      format: input.format ?? 'auto',
      ...(input.dateOrder ? { dateOrder: input.dateOrder } : {}),
    });
    if (!read.ok) readFailed(read.issues);
    const patientId = input.patientId ?? null;
    if (patientId !== null) await this.patients.get(patientId); // 404 before any work
    const { entries, skipped } = read.value;
    const report = await this.compute(entries, {}, patientId, skipped, [
      ...notes,
      ...read.value.notes,
    ]);
    return { report, entries, format: read.value.format };
  }

  /** Runs an audit and saves it whole (status 'incomplete' when lines could not be read). */
  async create(input: AuditInput): Promise<SavedAudit> {
    const { report, entries, format } = await this.run(input);
    const at = this.clock.now().toISOString();
    const id = await this.repo.insert({
      patientId: input.patientId ?? null,
      status: report.status,
      sourceFormat: format,
      entryCount: report.entries.length,
      matchedCount: report.entries.length - report.unmatched.length,
      entriesJson: JSON.stringify({ entries, skipped: report.skipped, notes: report.notes }),
      reportJson: JSON.stringify(report),
      createdBy: input.userId ?? null,
      at,
    });
    return { id, patientId: input.patientId ?? null, createdAt: at, updatedAt: at, report };
  }

  async get(id: number): Promise<SavedAudit> {
    const row = await this.repo.get(id);
    if (!row) throw new NotFoundError('diary audit', id);
    return {
      id: row.id,
      patientId: row.patientId,
      createdAt: row.createdAt,
      updatedAt: row.updatedAt,
      report: JSON.parse(row.reportJson) as DiaryReport,
    };
  }

  list(patientId?: number) {
    return this.repo.list(patientId);
  }

  patientOf(id: number): Promise<number | null> {
    return this.repo.patientOf(id);
  }

  /**
   * The dietitian confirms or changes the food of one line: the report is recomputed and saved,
   * and (unless `remember` is false) the choice is remembered for the same words next time.
   */
  async changeMatch(
    id: number,
    line: number,
    foodId: number,
    opts: { remember: boolean; userId: number | null; part?: number; quantity?: string },
  ): Promise<SavedAudit> {
    const row = await this.repo.get(id);
    if (!row) throw new NotFoundError('diary audit', id);
    const stored = JSON.parse(row.entriesJson) as {
      entries: DiaryEntryInput[];
      skipped: DiaryIssue[];
      notes: DiaryIssue[];
    };
    const part = opts.part ?? 0;
    const entry = stored.entries.find((e) => e.line === line && (e.part ?? 0) === part);
    if (!entry) {
      throw new AppError(
        'PHL_DIARY_LINE_NOT_FOUND',
        404,
        part > 0
          ? `diary audit ${id} has no food ${part + 1} on line ${line}`
          : `diary audit ${id} has no entry on line ${line}`,
      );
    }
    const food = await this.foodRepo.getFood(foodId);
    if (!food) throw new NotFoundError('food', foodId);
    const previous = (JSON.parse(row.overridesJson) as Overrides)[entryKey(entry)];
    // The line's own amount is kept when the food changes; an amount the reviewer entered before
    // stays unless a new one is given.
    const keptQuantity =
      opts.quantity ?? (typeof previous === 'object' ? previous.quantity : undefined);
    if (opts.quantity !== undefined) {
      const q = parseQuantity(opts.quantity);
      if (!q.ok) {
        throw new BadRequestError(
          'PHL_DIARY_QUANTITY',
          `quantity '${opts.quantity.slice(0, 100)}' not understood: ${q.issues.join('; ')}`,
        );
      }
    }
    const overrides: Overrides = {
      ...(JSON.parse(row.overridesJson) as Overrides),
      [entryKey(entry)]: keptQuantity ? { foodId, quantity: keptQuantity } : foodId,
    };
    const report = await this.compute(
      stored.entries,
      overrides,
      row.patientId,
      stored.skipped,
      stored.notes,
    );
    const at = this.clock.now().toISOString();
    const key = memoryKey(entry.foodText);
    await this.repo.saveChangedMatch({
      id,
      overridesJson: JSON.stringify(overrides),
      reportJson: JSON.stringify(report),
      matchedCount: report.entries.length - report.unmatched.length,
      at,
      remember:
        opts.remember && key
          ? { clinic: CLINIC_KEY, phraseKey: key, foodId, userId: opts.userId }
          : null,
    });
    return { id, patientId: row.patientId, createdAt: row.createdAt, updatedAt: at, report };
  }
}
