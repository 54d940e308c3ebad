import { useState } from "react";
import { useForm, type FieldErrors, type UseFormRegister } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useNavigate } from "react-router-dom";
import { z } from "zod";
import { createCampaignSchema, createSiteSchema, RESPONSE_SET_LABELS, RESPONSE_SETS } from "@calmcrest/contracts";
import { ApiError } from "../api/client";
import { useCreateCampaign, useCreateSite } from "../api/mutations";
import { Disclosure, Field, inputClass, numberInput, optionalNumber, SubmitRow } from "./form-parts";

type SiteForm = z.input<typeof createSiteSchema>;

/** A new candidate site (survey leads and administrators). */
export function NewSiteForm() {
  const create = useCreateSite();
  const navigate = useNavigate();
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<SiteForm, unknown, z.output<typeof createSiteSchema>>({ resolver: zodResolver(createSiteSchema) });
  const errors: FieldErrors<SiteForm> = formState.errors;
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      const site = await create.mutateAsync(input);
      await navigate(`/sites/${site.id}`);
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "The site could not be created. Try again.");
    }
  });
  return (
    <Disclosure title="Add a candidate site">
      <form onSubmit={onSubmit} noValidate className="grid gap-3 md:grid-cols-4">
        <Field id="site-name" label="Name" error={errors.name?.message}>
          {({ id, invalid }) => <input id={id} aria-invalid={invalid || undefined} className={inputClass} {...register("name")} />}
        </Field>
        <Field id="site-latitude" label="Latitude" unit="°, north positive" error={errors.latitude?.message}>
          {({ id, invalid }) => numberInput(id, invalid, register("latitude", { setValueAs: optionalNumber }), "-25.812")}
        </Field>
        <Field id="site-longitude" label="Longitude" unit="°, east positive" error={errors.longitude?.message}>
          {({ id, invalid }) => numberInput(id, invalid, register("longitude", { setValueAs: optionalNumber }), "-68.431")}
        </Field>
        <Field id="site-elevation" label="Elevation" unit="m" error={errors.elevationM?.message}>
          {({ id, invalid }) => numberInput(id, invalid, register("elevationM", { setValueAs: optionalNumber }), "4380")}
        </Field>
        <SubmitRow label="Create site" submitting={formState.isSubmitting} failure={failure} />
      </form>
    </Disclosure>
  );
}

export type CampaignForm = z.input<typeof createCampaignSchema>;

/** The monitor settings of a campaign form (new or edited): what makes its numbers comparable with other campaigns. */
export function MonitorFields({ idPrefix, register, errors }: { idPrefix: string; register: UseFormRegister<CampaignForm>; errors: FieldErrors<CampaignForm> }) {
  const monitorNumber = (name: "apertureMm" | "baselineMm" | "wavelengthNm" | "pixelScaleArcsec" | "exposureMs" | "heightAboveGroundM") =>
    register(`monitor.${name}`, { setValueAs: optionalNumber });
  return (
    <>
      <Field id={`${idPrefix}-aperture`} label="Subaperture diameter" unit="mm" error={errors.monitor?.apertureMm?.message}>
        {({ id, invalid }) => numberInput(id, invalid, monitorNumber("apertureMm"), "60")}
      </Field>
      <Field id={`${idPrefix}-baseline`} label="Baseline" unit="mm" error={errors.monitor?.baselineMm?.message}>
        {({ id, invalid }) => numberInput(id, invalid, monitorNumber("baselineMm"), "200")}
      </Field>
      <Field id={`${idPrefix}-wavelength`} label="Wavelength" unit="nm" error={errors.monitor?.wavelengthNm?.message}>
        {({ id, invalid }) => numberInput(id, invalid, monitorNumber("wavelengthNm"))}
      </Field>
      <Field id={`${idPrefix}-height`} label="Height above ground" unit="m" error={errors.monitor?.heightAboveGroundM?.message}>
        {({ id, invalid }) => numberInput(id, invalid, monitorNumber("heightAboveGroundM"), "6")}
      </Field>
      <Field id={`${idPrefix}-pixel`} label="Pixel scale" unit="″/px, for pixel² logs" error={errors.monitor?.pixelScaleArcsec?.message}>
        {({ id, invalid }) => numberInput(id, invalid, monitorNumber("pixelScaleArcsec"))}
      </Field>
      <Field id={`${idPrefix}-exposure`} label="Exposure" unit="ms" error={errors.monitor?.exposureMs?.message}>
        {({ id, invalid }) => numberInput(id, invalid, monitorNumber("exposureMs"))}
      </Field>
      <Field id={`${idPrefix}-response`} label="Response coefficients" error={errors.monitor?.response?.message}>
        {({ id }) => (
          <select id={id} className={inputClass} {...register("monitor.response")}>
            {RESPONSE_SETS.map((set) => (
              <option key={set} value={set}>
                {RESPONSE_SET_LABELS[set]}
              </option>
            ))}
          </select>
        )}
      </Field>
    </>
  );
}

/** A new campaign at a site: one monitor set up there for a period, with the settings its numbers depend on. */
export function NewCampaignForm({ siteId }: { siteId: number }) {
  const create = useCreateCampaign(siteId);
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState, reset } = useForm<CampaignForm, unknown, z.output<typeof createCampaignSchema>>({
    resolver: zodResolver(createCampaignSchema),
    defaultValues: { monitor: { wavelengthNm: 500, response: "z-tilt" }, status: "running" },
  });
  const errors = formState.errors;
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      await create.mutateAsync(input);
      reset();
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "The campaign could not be created. Try again.");
    }
  });
  return (
    <Disclosure title="Add a campaign at this site">
      <form onSubmit={onSubmit} noValidate className="grid gap-3 md:grid-cols-4">
        <Field id="campaign-name" label="Name" error={errors.name?.message}>
          {({ id, invalid }) => <input id={id} aria-invalid={invalid || undefined} className={inputClass} {...register("name")} />}
        </Field>
        <MonitorFields idPrefix="campaign" register={register} errors={errors} />
        <SubmitRow label="Create campaign" submitting={formState.isSubmitting} failure={failure} />
      </form>
    </Disclosure>
  );
}
