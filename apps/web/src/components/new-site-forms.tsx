import { useState, type ReactNode } from "react";
import { useForm, type FieldErrors, type UseFormRegisterReturn } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useQueryClient } from "@tanstack/react-query";
import { useNavigate } from "react-router-dom";
import { z } from "zod";
import { createCampaignSchema, createSiteSchema, RESPONSE_SET_LABELS, RESPONSE_SETS } from "@calmcrest/contracts";
import { ApiError } from "../api/client";
import { createCampaign, createSite } from "../api/sites";

// Empty number boxes mean "not given" (undefined), not NaN, so optional settings stay optional.
// React Hook Form also passes default values (numbers) through here, not only typed text.
const optionalNumber = (value: unknown) => (typeof value === "number" ? value : typeof value === "string" && value.trim() !== "" ? Number(value) : undefined);

function Field({ id, label, unit, error, children }: { id: string; label: string; unit?: string; error?: string; children: (props: { id: string; invalid: boolean }) => ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-semibold">
        {label}
        {unit ? <span className="font-normal text-ink-soft"> ({unit})</span> : null}
      </label>
      {children({ id, invalid: Boolean(error) })}
      {error ? <p className="mt-1 text-xs text-bad">{error}</p> : null}
    </div>
  );
}

const inputClass = "mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5";
const numberInput = (id: string, invalid: boolean, registration: UseFormRegisterReturn, placeholder?: string) => (
  <input id={id} inputMode="decimal" placeholder={placeholder} aria-invalid={invalid || undefined} className={`${inputClass} text-right tabular-nums`} {...registration} />
);

function Disclosure({ title, children }: { title: string; children: ReactNode }) {
  return (
    <details className="rounded-lg border border-line bg-panel p-4">
      <summary className="cursor-pointer font-semibold text-accent">{title}</summary>
      <div className="mt-3">{children}</div>
    </details>
  );
}

type SiteForm = z.input<typeof createSiteSchema>;

/** A new candidate site (survey leads and administrators). */
/** The submit button of a creation form, with the server's refusal (if any) under it. */
function SubmitRow({ label, submitting, failure }: { label: string; submitting: boolean; failure: string | null }) {
  return (
    <div className="md:col-span-4">
      <button type="submit" disabled={submitting} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
        {label}
      </button>
      {failure ? (
        <p role="alert" className="mt-2 rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
          {failure}
        </p>
      ) : null}
    </div>
  );
}

export function NewSiteForm() {
  const queryClient = useQueryClient();
  const navigate = useNavigate();
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<SiteForm, unknown, z.output<typeof createSiteSchema>>({ resolver: zodResolver(createSiteSchema) });
  const errors: FieldErrors<SiteForm> = formState.errors;
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      const site = await createSite(input);
      await queryClient.invalidateQueries({ queryKey: ["sites"] });
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

type CampaignForm = z.input<typeof createCampaignSchema>;

/** A new campaign at a site: one monitor set up there for a period, with the settings its numbers depend on. */
export function NewCampaignForm({ siteId }: { siteId: number }) {
  const queryClient = useQueryClient();
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState, reset } = useForm<CampaignForm, unknown, z.output<typeof createCampaignSchema>>({
    resolver: zodResolver(createCampaignSchema),
    defaultValues: { monitor: { wavelengthNm: 500, response: "z-tilt" }, status: "running" },
  });
  const errors = formState.errors;
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      await createCampaign(siteId, input);
      reset();
      await queryClient.invalidateQueries({ queryKey: ["sites"] });
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "The campaign could not be created. Try again.");
    }
  });
  const monitorNumber = (name: "apertureMm" | "baselineMm" | "wavelengthNm" | "pixelScaleArcsec" | "exposureMs" | "heightAboveGroundM") =>
    register(`monitor.${name}`, { setValueAs: optionalNumber });
  return (
    <Disclosure title="Add a campaign at this site">
      <form onSubmit={onSubmit} noValidate className="grid gap-3 md:grid-cols-4">
        <Field id="campaign-name" label="Name" error={errors.name?.message}>
          {({ id, invalid }) => <input id={id} aria-invalid={invalid || undefined} className={inputClass} {...register("name")} />}
        </Field>
        <Field id="campaign-aperture" label="Subaperture diameter" unit="mm" error={errors.monitor?.apertureMm?.message}>
          {({ id, invalid }) => numberInput(id, invalid, monitorNumber("apertureMm"), "60")}
        </Field>
        <Field id="campaign-baseline" label="Baseline" unit="mm" error={errors.monitor?.baselineMm?.message}>
          {({ id, invalid }) => numberInput(id, invalid, monitorNumber("baselineMm"), "200")}
        </Field>
        <Field id="campaign-wavelength" label="Wavelength" unit="nm" error={errors.monitor?.wavelengthNm?.message}>
          {({ id, invalid }) => numberInput(id, invalid, monitorNumber("wavelengthNm"))}
        </Field>
        <Field id="campaign-height" label="Height above ground" unit="m" error={errors.monitor?.heightAboveGroundM?.message}>
          {({ id, invalid }) => numberInput(id, invalid, monitorNumber("heightAboveGroundM"), "6")}
        </Field>
        <Field id="campaign-pixel" label="Pixel scale" unit="″/px, for pixel² logs" error={errors.monitor?.pixelScaleArcsec?.message}>
          {({ id, invalid }) => numberInput(id, invalid, monitorNumber("pixelScaleArcsec"))}
        </Field>
        <Field id="campaign-exposure" label="Exposure" unit="ms" error={errors.monitor?.exposureMs?.message}>
          {({ id, invalid }) => numberInput(id, invalid, monitorNumber("exposureMs"))}
        </Field>
        <Field id="campaign-response" label="Response coefficients" error={errors.monitor?.response?.message}>
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
        <SubmitRow label="Create campaign" submitting={formState.isSubmitting} failure={failure} />
      </form>
    </Disclosure>
  );
}
