import { useState } from "react";
import { useForm, type FieldErrors } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { z } from "zod";
import {
  CAMPAIGN_STATUSES,
  createCampaignSchema,
  createSiteSchema,
  type CampaignDetail,
  type CampaignMonitor,
  type PatchCampaignInput,
  type PatchSiteInput,
  type SiteDetail,
} from "@calmcrest/contracts";
import { ApiError } from "../api/client";
import { useUpdateCampaign, useUpdateSite } from "../api/mutations";
import { Disclosure, Field, inputClass, numberInput, optionalNumber, optionalText, SubmitRow } from "./form-parts";
import { MonitorFields, type CampaignForm } from "./new-site-forms";
import { MonitorSettings } from "./monitor-settings";

/**
 * The state of an edit form that sends only what changed: `save(patch)` says "nothing changed" for an empty patch,
 * else sends it and says it is saved, or shows the server's message (or `fallback` when there is none).
 */
function useSaveChanges<Patch extends object>(send: (patch: Patch) => Promise<unknown>, fallback: string) {
  const [failure, setFailure] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  async function save(patch: Patch): Promise<void> {
    setFailure(null);
    setDone(null);
    if (Object.keys(patch).length === 0) {
      setDone("Nothing was changed, so nothing was sent.");
      return;
    }
    try {
      await send(patch);
      setDone("Changes saved.");
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : fallback);
    }
  }
  return { failure, done, save };
}

type SiteForm = z.input<typeof createSiteSchema>;

/**
 * Corrects a site's name, position, elevation or notes (survey leads and administrators). Only the changed fields
 * are sent, so an unchanged position never trips the server's rule that a site with uploads cannot move.
 */
export function EditSiteForm({ site }: { site: SiteDetail }) {
  const update = useUpdateSite(site.id);
  // Resolves once the site list, this page and its campaigns' pages have been fetched again.
  const { failure, done, save } = useSaveChanges<PatchSiteInput>((patch) => update.mutateAsync(patch), "The site could not be changed. Try again.");
  const { register, handleSubmit, formState } = useForm<SiteForm, unknown, z.output<typeof createSiteSchema>>({
    resolver: zodResolver(createSiteSchema),
    defaultValues: { name: site.name, latitude: site.latitude, longitude: site.longitude, elevationM: site.elevationM, notes: site.notes },
  });
  const errors: FieldErrors<SiteForm> = formState.errors;
  const hasUploads = site.campaigns.some((campaign) => campaign.uploadCount > 0);

  const onSubmit = handleSubmit(async (input) => {
    const patch: PatchSiteInput = {};
    if (input.name !== site.name) patch.name = input.name;
    if (input.latitude !== site.latitude) patch.latitude = input.latitude;
    if (input.longitude !== site.longitude) patch.longitude = input.longitude;
    if (input.elevationM !== site.elevationM) patch.elevationM = input.elevationM;
    if ((input.notes ?? "") !== site.notes) patch.notes = input.notes ?? "";
    await save(patch);
  });

  return (
    <Disclosure title="Edit this site">
      <form onSubmit={onSubmit} noValidate className="grid gap-3 md:grid-cols-4">
        <Field id="edit-site-name" label="Name" error={errors.name?.message}>
          {({ id, invalid }) => <input id={id} aria-invalid={invalid || undefined} className={inputClass} {...register("name")} />}
        </Field>
        <Field id="edit-site-latitude" label="Latitude" unit="°, north positive" error={errors.latitude?.message}>
          {({ id, invalid }) => numberInput(id, invalid, register("latitude", { setValueAs: optionalNumber }))}
        </Field>
        <Field id="edit-site-longitude" label="Longitude" unit="°, east positive" error={errors.longitude?.message}>
          {({ id, invalid }) => numberInput(id, invalid, register("longitude", { setValueAs: optionalNumber }))}
        </Field>
        <Field id="edit-site-elevation" label="Elevation" unit="m" error={errors.elevationM?.message}>
          {({ id, invalid }) => numberInput(id, invalid, register("elevationM", { setValueAs: optionalNumber }))}
        </Field>
        <div className="md:col-span-4">
          <Field id="edit-site-notes" label="Notes" error={errors.notes?.message}>
            {({ id, invalid }) => <textarea id={id} rows={3} aria-invalid={invalid || undefined} className={inputClass} {...register("notes")} />}
          </Field>
        </div>
        {hasUploads ? (
          <p className="text-sm text-ink-soft md:col-span-4">
            This site has uploads, so its position is fixed: their sun altitudes were computed from it. Name, elevation and notes can still change.
          </p>
        ) : null}
        <SubmitRow label="Save site" submitting={formState.isSubmitting} failure={failure} done={done} />
      </form>
    </Disclosure>
  );
}

const MONITOR_KEYS = ["apertureMm", "baselineMm", "wavelengthNm", "pixelScaleArcsec", "exposureMs", "heightAboveGroundM", "response"] as const;

/** The stored monitor as form values: values not recorded (null) are empty boxes. */
function monitorDefaults(monitor: CampaignMonitor): CampaignForm["monitor"] {
  return {
    apertureMm: monitor.apertureMm,
    baselineMm: monitor.baselineMm,
    wavelengthNm: monitor.wavelengthNm,
    pixelScaleArcsec: monitor.pixelScaleArcsec ?? undefined,
    exposureMs: monitor.exposureMs ?? undefined,
    heightAboveGroundM: monitor.heightAboveGroundM ?? undefined,
    response: monitor.response,
  };
}

const capitalised = (text: string) => `${text.charAt(0).toUpperCase()}${text.slice(1)}`;

/**
 * Changes a campaign's name, status, dates, notes or monitor (where `can.edit`). Only changed fields are sent; the
 * monitor goes as a whole and only when one of its settings changed, which the server refuses once uploads exist.
 */
export function EditCampaignForm({ campaign }: { campaign: CampaignDetail }) {
  const update = useUpdateCampaign(campaign.id);
  // The campaign shows on its own page, on its site's page and in the campaign list; resolves once they are fetched again.
  const { failure, done, save } = useSaveChanges<PatchCampaignInput>((patch) => update.mutateAsync(patch), "The campaign could not be changed. Try again.");
  const { register, handleSubmit, formState } = useForm<CampaignForm, unknown, z.output<typeof createCampaignSchema>>({
    resolver: zodResolver(createCampaignSchema),
    defaultValues: {
      name: campaign.name,
      status: campaign.status,
      startDate: campaign.startDate ?? undefined,
      endDate: campaign.endDate ?? undefined,
      notes: campaign.notes,
      monitor: monitorDefaults(campaign.monitor),
    },
  });
  const errors: FieldErrors<CampaignForm> = formState.errors;

  const onSubmit = handleSubmit(async (input) => {
    const patch: PatchCampaignInput = {};
    if (input.name !== campaign.name) patch.name = input.name;
    if (input.status !== campaign.status) patch.status = input.status;
    // A cleared date box removes the date (null), as the server's change schema expects.
    if ((input.startDate ?? null) !== campaign.startDate) patch.startDate = input.startDate ?? null;
    if ((input.endDate ?? null) !== campaign.endDate) patch.endDate = input.endDate ?? null;
    if ((input.notes ?? "") !== campaign.notes) patch.notes = input.notes ?? "";
    const stored = monitorDefaults(campaign.monitor);
    if (MONITOR_KEYS.some((key) => input.monitor[key] !== stored[key])) patch.monitor = input.monitor;
    await save(patch);
  });

  return (
    <Disclosure title="Edit this campaign">
      <form onSubmit={onSubmit} noValidate className="grid gap-3 md:grid-cols-4">
        <Field id="edit-campaign-name" label="Name" error={errors.name?.message}>
          {({ id, invalid }) => <input id={id} aria-invalid={invalid || undefined} className={inputClass} {...register("name")} />}
        </Field>
        <Field id="edit-campaign-status" label="Status" error={errors.status?.message}>
          {({ id }) => (
            <select id={id} className={inputClass} {...register("status")}>
              {CAMPAIGN_STATUSES.map((status) => (
                <option key={status} value={status}>
                  {capitalised(status)}
                </option>
              ))}
            </select>
          )}
        </Field>
        <Field id="edit-campaign-start" label="Start date" unit="UTC" error={errors.startDate?.message}>
          {({ id, invalid }) => <input id={id} type="date" aria-invalid={invalid || undefined} className={inputClass} {...register("startDate", { setValueAs: optionalText })} />}
        </Field>
        <Field id="edit-campaign-end" label="End date" unit="UTC" error={errors.endDate?.message}>
          {({ id, invalid }) => <input id={id} type="date" aria-invalid={invalid || undefined} className={inputClass} {...register("endDate", { setValueAs: optionalText })} />}
        </Field>
        <fieldset className="grid gap-3 md:col-span-4 md:grid-cols-4">
          <legend className="mb-1 text-sm font-semibold">Monitor</legend>
          {campaign.uploadCount > 0 ? (
            // Locked fields are not shown as editable boxes: saying so only after Save would waste the typing.
            <div className="space-y-2 text-sm md:col-span-4" data-testid="monitor-locked">
              <p className="font-semibold">Locked: this campaign has uploads, and its samples were computed with these settings.</p>
              <MonitorSettings monitor={campaign.monitor} />
              <p className="text-ink-soft">
                For one file read with wrong settings, use “Re-read…” on that upload below and give the corrected settings. For a monitor that changed, create a new campaign at the site.
              </p>
            </div>
          ) : (
            <MonitorFields idPrefix="edit-campaign" register={register} errors={errors} />
          )}
        </fieldset>
        <div className="md:col-span-4">
          <Field id="edit-campaign-notes" label="Notes" error={errors.notes?.message}>
            {({ id, invalid }) => <textarea id={id} rows={3} aria-invalid={invalid || undefined} className={inputClass} {...register("notes")} />}
          </Field>
        </div>
        <SubmitRow label="Save campaign" submitting={formState.isSubmitting} failure={failure} done={done} />
      </form>
    </Disclosure>
  );
}
