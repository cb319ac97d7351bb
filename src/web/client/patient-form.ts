/** Reads the new-patient form into the body `POST /api/patients` takes. */
export type FormRead<T> = { ok: true; value: T } | { ok: false; message: string };

export function readPatientForm(form: HTMLFormElement): FormRead<Record<string, unknown>> {
  const get = (n: string) => form.elements.namedItem(n) as HTMLInputElement | HTMLSelectElement;
  const label = get('label').value.trim();
  const weightText = get('weightKg').value.trim();
  for (const el of [get('label'), get('weightKg')]) el.removeAttribute('aria-invalid');
  if (!label) {
    get('label').setAttribute('aria-invalid', 'true');
    get('label').focus();
    return { ok: false, message: 'Give a clinic label or pseudonym.' };
  }
  const weightKg = Number(weightText);
  if (!weightText || !Number.isFinite(weightKg) || weightKg < 20 || weightKg > 300) {
    get('weightKg').setAttribute('aria-invalid', 'true');
    get('weightKg').focus();
    return { ok: false, message: 'Weight used for targets must be 20–300 kg.' };
  }
  const name = get('name').value.trim();
  return {
    ok: true,
    value: {
      label,
      name: name || null,
      language: get('language').value,
      weightKg,
      ckdStage: get('ckdStage').value,
      dialysis: get('dialysis').value,
      diabetes: (get('diabetes') as HTMLInputElement).checked,
    },
  };
}
