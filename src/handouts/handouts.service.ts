import type { Clock } from '../clock.js';
import type { Db } from '../db/database.js';
import { ADDITIVE_CATALOGUE } from '../additives/catalogue.js';
import { AppError } from '../errors.js';
import { FoodRepository } from '../foods/foods.repository.js';
import { localIsoDate } from '../i18n/format.js';
import type { Languages } from '../i18n/loader.js';
import type { LanguageStatus } from '../i18n/catalogue.js';
import { PatientService } from '../patients/patients.service.js';
import { settingsSource } from '../plans/plan-settings-source.js';
import { PlanService } from '../plans/plans.service.js';
import { SettingsService } from '../settings/settings.service.js';
import { selectWatchAdditives } from './foods-to-watch.js';
import type {
  AdditiveLabelEntry,
  HandoutClinic,
  HandoutPatient,
  HandoutSummary,
  PaperSize,
} from './handout.js';
import { renderHandoutHtml } from './handout-html.js';
import { renderHandoutPdf } from './handout-pdf.js';
import { RenderCache } from './render-cache.js';
import { GlossaryService } from '../glossary/glossary.service.js';
import { DEMO_CLINIC } from '../plans/demo-seed.js';
import { drinkVolume } from './drinks.js';
import {
  buildHandoutViewModel,
  type HandoutFoodInfo,
  type HandoutViewModel,
} from './view-model.js';

/**
 * Whether the clinic details may go on this plan's handout: a real patient's handout needs the
 * clinic's own name and contact, never the invented demo clinic's. Pure.
 */
export function clinicReadyFor(clinic: HandoutClinic, isDemoPlan: boolean): string[] {
  if (isDemoPlan) return [];
  const missing: string[] = [];
  const isDemo = (v: string, demo: string) => v.trim() === demo || /invented demo/i.test(v);
  if (!clinic.name.trim() || isDemo(clinic.name, DEMO_CLINIC.name)) missing.push('name');
  if (!clinic.contact.trim() || isDemo(clinic.contact, DEMO_CLINIC.contact))
    missing.push('contact');
  if (!clinic.dietitianName.trim() || isDemo(clinic.dietitianName, DEMO_CLINIC.dietitianName)) {
    missing.push('dietitianName');
  }
  return missing;
}

/** Where a handout's data comes from (the database in the app; fakes in tests). */
export interface HandoutSources {
  /** The plan's summary: its latest version, or the saved version asked for. */
  summary(planId: number, version?: number): Promise<HandoutSummary>;
  patient(patientId: number): Promise<HandoutPatient>;
  clinic(): Promise<HandoutClinic>;
  /** Names (glossary, the table's own language, starter) and drink densities of the foods. */
  foods?(foodIds: readonly number[], language: string): Promise<Map<number, HandoutFoodInfo>>;
  /** Whether the plan is the invented demo plan (demo clinic details are allowed on it). */
  isDemoPlan?(planId: number): Promise<boolean>;
}

/** The real sources: the plans service's summary, the patient record, the `clinic` setting. */
export function handoutSourcesFromDb(
  db: Db,
  clock: Clock,
  languageList: readonly string[],
): HandoutSources {
  const plans = new PlanService(
    db.kysely,
    clock,
    new FoodRepository(db.kysely),
    settingsSource(db),
  );
  const patients = new PatientService(db.kysely, clock);
  const settings = new SettingsService(db, clock);
  const foodRepo = new FoodRepository(db.kysely);
  const glossary = new GlossaryService(db.kysely, clock, languageList);
  return {
    async foods(foodIds, language) {
      const foods = [...(await foodRepo.getFoods(foodIds)).values()];
      const names = await glossary.nameSources(foods, language);
      return new Map(
        foods.map((f) => [
          f.id,
          { names: names.get(f.id) ?? { foodName: f.name }, drink: drinkVolume(f) },
        ]),
      );
    },
    isDemoPlan: async (planId) => (await plans.header(planId)).isDemo,
    summary: (planId, version) => plans.getSummary(planId, version),
    async patient(patientId) {
      const p = await patients.get(patientId);
      return { label: p.label, language: p.language };
    },
    clinic: () => settings.get('clinic'),
  };
}

/** What a handout is asked for with: language, paper and, for a past sheet, the saved version. */
export interface HandoutOptions {
  lang?: string | undefined;
  paper: PaperSize;
  version?: number | undefined;
}

export interface PreparedHandout {
  vm: HandoutViewModel;
  status: LanguageStatus;
  /** Clinic fields still to fill in before this plan's handout can be printed. */
  clinicMissing: string[];
}

const WATCH_ADDITIVES: AdditiveLabelEntry[] = selectWatchAdditives(ADDITIVE_CATALOGUE);

/** Rendered PDFs kept per process (a 3-day handout is well under 1 MB; 32 of them at most). */
const PDF_CACHE_ENTRIES = 32;

/** Builds handouts: the language chosen (asked for, else the patient's, else English). */
export class HandoutService {
  private readonly pdfCache = new RenderCache<Awaited<ReturnType<typeof renderHandoutPdf>>>(
    PDF_CACHE_ENTRIES,
  );

  constructor(
    private readonly sources: HandoutSources,
    private readonly languages: Languages,
    private readonly clock: Clock,
    private readonly timeZone?: string,
  ) {}

  /** The languages there are, with review status and missing strings (for the clinic). */
  languageStatuses(): LanguageStatus[] {
    return this.languages.list().map((l) => this.languages.bundle(l).status());
  }

  /**
   * The view-model of a plan's handout. mode 'refuse' (PDF, CLI): a language missing strings is
   * an error listing them; 'mark' (the clinic's HTML view): English stands in, marked [EN].
   */
  async prepare(
    planId: number,
    opts: { lang?: string | undefined; version?: number | undefined; mode: 'refuse' | 'mark' },
  ): Promise<PreparedHandout> {
    const summary = await this.sources.summary(planId, opts.version);
    const [patient, clinic] = await Promise.all([
      this.sources.patient(summary.patientId),
      this.sources.clinic(),
    ]);
    const isDemoPlan = this.sources.isDemoPlan ? await this.sources.isDemoPlan(planId) : true;
    const clinicMissing = clinicReadyFor(clinic, isDemoPlan);
    if (opts.mode === 'refuse' && clinicMissing.length > 0) {
      throw new AppError(
        'PHL_HANDOUT_CLINIC_NOT_SET',
        409,
        `fill in the clinic details first (Clinic settings: ${clinicMissing.join(', ')}): a real patient's handout never carries the invented demo clinic or an empty one`,
        { missing: clinicMissing },
      );
    }
    const asked = opts.lang ?? patient.language ?? 'en';
    const language = this.languages.resolve(asked);
    if (!language) {
      throw new AppError(
        'PHL_HANDOUT_LANGUAGE_UNKNOWN',
        400,
        `no message catalogue for language '${asked}'; available: ${this.languages.list().join(', ')}`,
        { language: asked, available: this.languages.list() },
      );
    }
    const bundle = this.languages.bundle(language);
    const foodIds = [
      ...new Set(
        summary.days.flatMap((d) => d.occasions.flatMap((o) => o.items.map((i) => i.foodId))),
      ),
    ];
    const foods = this.sources.foods ? await this.sources.foods(foodIds, language) : undefined;
    const built = buildHandoutViewModel(
      summary,
      patient,
      clinic,
      language,
      bundle,
      localIsoDate(this.clock.now(), this.timeZone),
      { additives: WATCH_ADDITIVES, fallback: opts.mode, ...(foods ? { foods } : {}) },
    );
    if (!built.ok) {
      throw new AppError(
        'PHL_HANDOUT_LANGUAGE_INCOMPLETE',
        422,
        `the ${language} catalogue (templates/locales/${language}.json) lacks ${built.missingKeys.length} string(s) a handout needs: ${built.missingKeys.join(', ')}. Add them, or print in another language; the clinic view shows them in English.`,
        { language, missingKeys: built.missingKeys },
      );
    }
    return { vm: built.value, status: bundle.status(), clinicMissing };
  }

  async pdf(planId: number, opts: HandoutOptions) {
    const { vm, status } = await this.prepare(planId, {
      lang: opts.lang,
      version: opts.version,
      mode: 'refuse',
    });
    const key = RenderCache.keyOf(vm, opts.paper);
    let rendered = this.pdfCache.get(key);
    if (!rendered) {
      rendered = await renderHandoutPdf(vm, opts.paper);
      this.pdfCache.set(key, rendered);
    }
    if (rendered.missingCodePoints.length > 0 || rendered.notdefRuns > 0) {
      const cps = rendered.missingCodePoints.map(
        (c) => `U+${c.toString(16).toUpperCase().padStart(4, '0')}`,
      );
      throw new AppError(
        'PHL_HANDOUT_GLYPHS_MISSING',
        422,
        `the embedded fonts cannot draw ${cps.join(' ') || 'some characters'} (language ${vm.language}); the handout would show empty boxes`,
        { language: vm.language, codePoints: cps },
      );
    }
    return {
      bytes: rendered.bytes,
      pageCount: rendered.pageCount,
      language: vm.language,
      status,
      filename: `plan-${planId}${opts.version ? `-v${opts.version}` : ''}-${vm.language}-${opts.paper}.pdf`,
    };
  }

  async html(planId: number, opts: HandoutOptions) {
    const prepared = await this.prepare(planId, {
      lang: opts.lang,
      version: opts.version,
      mode: 'mark',
    });
    return {
      html: renderHandoutHtml(prepared.vm, {
        paper: opts.paper,
        status: prepared.status,
        planId,
        version: opts.version,
      }),
      language: prepared.vm.language,
      status: prepared.status,
      clinicMissing: prepared.clinicMissing,
    };
  }
}
