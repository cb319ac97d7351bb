import { sql } from 'kysely';
import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { AppError, BadRequestError, NotFoundError } from '../errors.js';
import type { Food, FoodKind } from '../foods/food.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { FoodService } from '../foods/foods.service.js';
import { FoodNameIndex, type NameRow } from '../foods/name-index.js';
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
  decodeDiaryBytes,
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
 * Search results shared by every audit while the food tables stay the same (a diary names the
 * same few hundred foods again and again); dropped whole when a table is imported or removed.
 */
interface SharedCache {
  stamp: string;
  results: Map<string, Promise<Food[]>>;
  /** Swaps by food id and settings (they depend on the tables and the absorption settings). */
  swaps: Map<string, Promise<DiarySwap | null>>;
  /** Foods by id, as search hits and swap candidates load them. */
  foods: Map<number, Food>;
  /** Each kind's names in memory, once built (null when too many or not buildable). */
  names: Map<FoodKind, NameSlot>;
}

interface NameSlot {
  /** Set when the build has finished: the index, or null (the SQL queries answer). */
  index: FoodNameIndex | null | undefined;
  building: Promise<FoodNameIndex | null>;
}
const sharedSearches = new WeakMap<object, SharedCache>();
const MAX_SHARED = 5000;
/** Foods kept for audits (SR28 has 8,789; a bound for larger tables, not a tuned size). */
const MAX_SHARED_FOODS = 20_000;
/**
 * Foods of one kind held as a name index (common practice, no source: a bound on memory, about
 * 20 MB at this size; a million branded foods stay with the SQL indexes).
 */
const MAX_INDEXED_FOODS = 50_000;

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

/** Passes over the warm-up diary: enough for V8 to optimise the scorer (measured, no source). */
const WARM_UP_PASSES = 3;

/** Resolves in a later event-loop turn: long preparation lets requests in between its steps. */
const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * The food repository as audits see it: foods come from the shared cache when an earlier search
 * or swap loaded them under the same tables, so the scorer's per-food work is done once; the
 * search's candidate queries are answered from the name index when there is one (it gives the
 * same rows in the same order as SQLite, see foods/name-index.ts).
 */
class SharedFoodRepository extends FoodRepository {
  /**
   * `buildInBackground`: a missing name index is built in the background when a search finds
   * none (a long-running server); a one-shot process (the CLI) searches with SQL instead, as
   * building costs more than one diary's searches.
   */
  constructor(
    db: Db,
    private readonly shared: SharedCache,
    private readonly buildInBackground: boolean,
  ) {
    super(db.kysely);
  }

  /** The name index of one kind under the current tables, built now if need be. */
  async names(kind: FoodKind): Promise<FoodNameIndex | null> {
    return this.slot(kind).building;
  }

  /** The index when it is built; otherwise null (and, if allowed, starts building it). */
  private readyNames(kind: FoodKind): FoodNameIndex | null {
    const slot = this.shared.names.get(kind) ?? (this.buildInBackground ? this.slot(kind) : null);
    return slot?.index ?? null;
  }

  private slot(kind: FoodKind): NameSlot {
    let slot = this.shared.names.get(kind);
    if (!slot) {
      const made: NameSlot = {
        index: undefined,
        // A later turn: the search that asked goes on with SQL meanwhile.
        building: nextTurn()
          .then(() => super.loadNameIndexSource(kind, MAX_INDEXED_FOODS))
          .then(
            (source) => (source ? new FoodNameIndex(source) : null),
            () => null, // e.g. no temporary tables on this connection: SQL still answers
          )
          .then((index) => (made.index = index)),
      };
      slot = made;
      this.shared.names.set(kind, slot);
    }
    return slot;
  }

  override async nameStartCandidates(
    opts: Parameters<FoodRepository['nameStartCandidates']>[0],
  ): Promise<NameRow[]> {
    if (!opts.source && !opts.group) {
      const index = this.readyNames(opts.kind);
      if (index) return index.nameStart(opts.prefix, opts.limit);
    }
    return super.nameStartCandidates(opts);
  }

  override async wordCandidates(
    opts: Parameters<FoodRepository['wordCandidates']>[0],
  ): Promise<NameRow[]> {
    if (!opts.source && !opts.group) {
      const found = this.readyNames(opts.kind)?.wordCandidates(opts.words, opts.limit);
      if (found) return found;
    }
    return super.wordCandidates(opts);
  }

  override async getFoods(ids: readonly number[]): Promise<Map<number, Food>> {
    const { foods } = this.shared;
    const missing = ids.filter((id) => !foods.has(id));
    if (missing.length > 0) {
      if (foods.size + missing.length > MAX_SHARED_FOODS) foods.clear();
      for (const [id, f] of await super.getFoods(missing)) foods.set(id, f);
    }
    const out = new Map<number, Food>();
    for (const id of ids) {
      const f = foods.get(id);
      if (f) out.set(id, f);
    }
    return out;
  }
}

/** What one audit works with: the shared cache of the tables as they were when it started. */
interface AuditTools {
  foodRepo: SharedFoodRepository;
  foodService: FoodService;
  swaps: SwapService;
  /** Searches and swaps remembered: the shared ones, or the audit's own (the warm-up). */
  results: SharedCache['results'];
  swapMemo: SharedCache['swaps'];
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
   * food loaded with its scoring features (when they fit the shared cache). Run at start-up and
   * after an import; an audit that comes first builds what it needs itself. Yields between steps.
   */
  async prepare(opts: { signal?: AbortSignal } = {}): Promise<{ indexed: number; foods: number }> {
    const stopped = () => opts.signal?.aborted === true;
    if (stopped()) return { indexed: 0, foods: 0 };
    const { foodRepo } = await this.tools();
    const [generic, branded] = await Promise.all([
      foodRepo.names('generic'),
      foodRepo.names('branded'),
    ]);
    let foods = 0;
    const ids = generic?.ids() ?? [];
    if (ids.length <= MAX_SHARED_FOODS) {
      for (let i = 0; i < ids.length; i += 500) {
        await nextTurn();
        if (stopped()) return { indexed: 0, foods };
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

  /** The shared cache of the tables as they are now (dropped whole when they have changed). */
  private async shared(): Promise<SharedCache> {
    const s = await sql<{
      stamp: string;
    }>`select coalesce(max(id), 0) || ':' || count(*) || ':' || coalesce(sum(food_count), 0) as stamp from food_source`.execute(
      this.db.kysely,
    );
    const stamp = s.rows[0]?.stamp ?? '';
    let shared = sharedSearches.get(this.db.sqlite);
    if (!shared || shared.stamp !== stamp) {
      shared = { stamp, results: new Map(), swaps: new Map(), foods: new Map(), names: new Map() };
      sharedSearches.set(this.db.sqlite, shared);
    } else if (shared.results.size > MAX_SHARED) {
      // Bounded: the remembered searches and swaps start again; foods and names stay.
      shared.results = new Map();
      shared.swaps = new Map();
    }
    return shared;
  }

  /** One audit's tools over one look at the shared cache (one stamp query per audit). */
  private async tools(scratch = false): Promise<AuditTools> {
    const shared = await this.shared();
    const foodRepo = new SharedFoodRepository(this.db, shared, this.longRunning);
    return {
      foodRepo,
      foodService: new FoodService(foodRepo),
      swaps: new SwapService(this.db.kysely, foodRepo, this.settings),
      results: scratch ? new Map() : shared.results,
      swapMemo: scratch ? new Map() : shared.swaps,
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
    overrides: Readonly<Record<string, number>>,
    tools: AuditTools,
  ): Promise<Map<number, EntryMatchInput>> {
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
    const chosenIds = Object.values(overrides);
    const chosen = chosenIds.length > 0 ? await tools.foodRepo.getFoods(chosenIds) : new Map();
    const out = new Map<number, EntryMatchInput>();
    for (const e of entries) {
      const o = overrides[String(e.line)];
      const food = o === undefined ? undefined : chosen.get(o);
      if (food) {
        out.set(e.line, {
          food,
          method: 'confirmed',
          confidence: 1,
          candidates: [],
          notes: ['food chosen by the dietitian'],
        });
        continue;
      }
      out.set(e.line, await matcher.match({ foodText: e.foodText, barcode: e.barcode }));
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
    overrides: Readonly<Record<string, number>>,
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
    opts: { remember: boolean; userId: number | null },
  ): Promise<SavedAudit> {
    const row = await this.repo.get(id);
    if (!row) throw new NotFoundError('diary audit', id);
    const stored = JSON.parse(row.entriesJson) as {
      entries: DiaryEntryInput[];
      skipped: DiaryIssue[];
      notes: DiaryIssue[];
    };
    const entry = stored.entries.find((e) => e.line === line);
    if (!entry) {
      throw new AppError(
        'PHL_DIARY_LINE_NOT_FOUND',
        404,
        `diary audit ${id} has no entry on line ${line}`,
      );
    }
    const food = await this.foodRepo.getFood(foodId);
    if (!food) throw new NotFoundError('food', foodId);
    const overrides = {
      ...(JSON.parse(row.overridesJson) as Record<string, number>),
      [String(line)]: foodId,
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
