import { useEffect, useState } from 'preact/hooks';
import type { Asset } from '../../../model/job';
import { findSameAsset, putAsset, putTechnician } from '../../../store/assets';
import { newId } from '../../../store/ids';
import { createJob, jobsForAsset } from '../../../store/jobs';
import { useApp } from '../../app-context';
import { ScreenTitle } from '../../components/ScreenTitle';
import { TextField } from '../../components/TextField';
import { navigate } from '../../router';
import { useDraft } from '../../use-draft';

const FORM = {
  customer: '',
  site: '',
  assetKind: '',
  make: '',
  model: '',
  serial: '',
  tag: '',
  technicianId: '',
  technicianName: '',
  complaint: '',
};
type NewJobForm = typeof FORM;
const NEW_TECHNICIAN = 'new';

/** Customer, site, the appliance or equipment, technician and complaint: then on to the supply. */
export function NewJobScreen() {
  const { db, saver, settings, technicians, reloadTechnicians, changeSettings } = useApp();
  const draft = useDraft<NewJobForm>(db, saver, 'new-job', () => ({ ...FORM, technicianId: settings.technicianId ?? technicians[0]?.id ?? NEW_TECHNICIAN }), 'the new job form');
  const [problem, setProblem] = useState<{ field: keyof NewJobForm; message: string } | null>(null);
  const [known, setKnown] = useState<{ asset: Asset; jobs: number } | null>(null);
  const [busy, setBusy] = useState(false);
  const values = draft.values;

  // A serial or tag already on file at this customer: the same unit, with its history.
  const serial = values?.serial ?? '';
  const tag = values?.tag ?? '';
  const customer = values?.customer ?? '';
  useEffect(() => {
    let live = true;
    void findSameAsset(db, { customer, site: '', serial, tag }).then(async (asset) => {
      const jobs = asset === undefined ? 0 : (await jobsForAsset(db, asset.id)).length;
      if (live) setKnown(asset === undefined ? null : { asset, jobs });
    });
    return () => {
      live = false;
    };
  }, [db, serial, tag, customer]);

  if (values === null) return <p class="loading" role="status">Opening the form…</p>;

  const field = (name: keyof NewJobForm, label: string, extra: { hint?: string; kind?: 'text' | 'long'; autoComplete?: string } = {}) => (
    <TextField
      id={`new-${name}`}
      label={label}
      kind={extra.kind ?? 'text'}
      hint={extra.hint}
      autoComplete={extra.autoComplete ?? 'off'}
      value={values[name]}
      onInput={(value) => {
        draft.change({ [name]: value } as Partial<NewJobForm>);
        if (problem?.field === name) setProblem(null);
      }}
      error={problem?.field === name ? problem.message : undefined}
    />
  );

  const start = async () => {
    if (values.customer.trim() === '') return setProblem({ field: 'customer', message: 'Enter the customer (a name is enough).' });
    if (values.assetKind.trim() === '') return setProblem({ field: 'assetKind', message: 'Say what the appliance or equipment is, e.g. “washing machine”.' });
    const newTechnician = values.technicianId === NEW_TECHNICIAN || !technicians.some((t) => t.id === values.technicianId);
    if (newTechnician && values.technicianName.trim() === '') return setProblem({ field: 'technicianName', message: 'Enter your name, so the job says who did it.' });
    setBusy(true);
    const result = await saver.save('the new job', async () => {
      let technicianId = values.technicianId;
      if (newTechnician) {
        technicianId = newId();
        await putTechnician(db, { id: technicianId, name: values.technicianName.trim() });
      }
      let asset = known?.asset;
      if (asset === undefined) {
        asset = { id: newId(), kind: values.assetKind.trim(), customer: values.customer.trim(), site: values.site.trim() };
        for (const key of ['make', 'model', 'serial', 'tag'] as const) {
          const text = values[key].trim();
          if (text !== '') asset[key] = text;
        }
        await putAsset(db, asset);
      }
      const job = await createJob(db, {
        customer: values.customer.trim(),
        site: values.site.trim(),
        technicianId,
        complaint: values.complaint.trim(),
        assetId: asset.id,
        meter: settings.meter,
        nameplate: { region: settings.region },
      });
      return { job, technicianId, newTechnician };
    });
    setBusy(false);
    if (!result.ok) return;
    if (result.value.newTechnician) {
      await reloadTechnicians();
      await changeSettings({ technicianId: result.value.technicianId });
    }
    await draft.discard();
    navigate({ screen: 'job', jobId: result.value.job.id, tab: 'supply' });
  };

  return (
    <section class="screen" aria-labelledby="new-job-title">
      <div id="new-job-title">
        <ScreenTitle>New job</ScreenTitle>
      </div>
      <p class="hint">Everything you type is kept as you type it.</p>
      <form
        noValidate
        onSubmit={(event) => {
          event.preventDefault();
          void start();
        }}
      >
        <fieldset>
          <legend>Customer</legend>
          {field('customer', 'Customer', { autoComplete: 'name' })}
          {field('site', 'Site or address', { hint: 'Where the unit is: address, building, room.' })}
        </fieldset>
        <fieldset>
          <legend>Appliance or equipment</legend>
          {field('assetKind', 'What it is', { hint: 'e.g. washing machine, boiler, control panel.' })}
          {field('make', 'Make')}
          {field('model', 'Model')}
          {field('serial', 'Serial number')}
          {field('tag', 'Asset tag', { hint: 'The site’s own label, if it has one.' })}
          {known === null ? null : (
            <p class="notice" role="status">
              This unit is on file ({known.asset.kind}{known.asset.model ? `, ${known.asset.model}` : ''}): {known.jobs} earlier job{known.jobs === 1 ? '' : 's'}.
              Its earlier readings will show beside today’s.
            </p>
          )}
        </fieldset>
        <fieldset>
          <legend>Job</legend>
          <div class="field">
            <label for="new-technicianId">Technician</label>
            <select id="new-technicianId" value={values.technicianId} onChange={(event) => draft.change({ technicianId: event.currentTarget.value })}>
              {technicians.map((t) => (
                <option key={t.id} value={t.id}>{t.name}</option>
              ))}
              <option value={NEW_TECHNICIAN}>Someone new…</option>
            </select>
          </div>
          {values.technicianId === NEW_TECHNICIAN || !technicians.some((t) => t.id === values.technicianId)
            ? field('technicianName', 'Your name', { autoComplete: 'name' })
            : null}
          {field('complaint', 'Complaint', { kind: 'long', hint: 'What the customer reports, in their words.' })}
        </fieldset>
        <button type="submit" class="primary" disabled={busy}>
          {busy ? 'Starting…' : 'Start the job'}
        </button>
      </form>
    </section>
  );
}
