/** Every API path the screens call, in one place. */
export const endpoints = {
  patients: '/api/patients',
  patient: (id: string | number) => `/api/patients/${id}`,
  patientTargets: (id: string | number) => `/api/patients/${id}/targets`,
  patientPlans: (id: string | number) => `/api/patients/${id}/plans`,
  patientLabs: (id: string | number) => `/api/patients/${id}/labs`,
  patientTrends: (id: string | number) => `/api/patients/${id}/trends`,
  labsImport: '/api/labs/import',
  plan: (id: string | number) => `/api/plans/${id}`,
  planSummary: (id: string | number, version?: number) =>
    `/api/plans/${id}/summary${version ? `?version=${version}` : ''}`,
  planVersions: (id: string | number) => `/api/plans/${id}/versions`,
  planVersion: (id: string | number, version: number) => `/api/plans/${id}/versions/${version}`,
  planBinders: (id: string | number) => `/api/plans/${id}/binders`,
  planBalance: (id: string | number) => `/api/plans/${id}/balance`,
  swaps: (foodId: number, limit = 5) => `/api/swaps/${foodId}?limit=${limit}`,
  food: (id: number) => `/api/foods/${id}`,
  handoutHtml: (planId: string | number, lang: string, version?: number | null) =>
    `/plans/${planId}/handout?lang=${encodeURIComponent(lang)}${version ? `&version=${version}` : ''}`,
  handoutPdf: (planId: string | number, lang: string, paper: string, version?: number | null) =>
    `/api/plans/${planId}/handout.pdf?lang=${encodeURIComponent(lang)}&paper=${paper}${version ? `&version=${version}` : ''}`,
  diaryAudits: '/api/diary-audits',
  diaryAudit: (id: string | number) => `/api/diary-audits/${id}`,
  diaryAuditPdf: (id: string | number) => `/api/diary-audits/${id}.pdf`,
  sources: '/api/sources',
  imports: '/api/imports',
  importJob: (id: string | number) => `/api/imports/${id}`,
  importFormats: '/api/imports/formats',
  setting: (key: string) => `/api/settings/${key}`,
};
