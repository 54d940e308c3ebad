import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { createExclusionSchema, type CampaignDetail, type CreateExclusionInput } from "@calmcrest/contracts";
import { useAddExclusion, useRemoveExclusion } from "../api/mutations";
import { ApiError } from "../api/client";
import { formatDateTimeUtc } from "../lib/format";
import { Problem } from "./page";

/** Exclusion windows of a campaign: samples inside leave every statistic (with the reason on record). */
export function Exclusions({ campaign }: { campaign: CampaignDetail }) {
  const add = useAddExclusion(campaign.id);
  const remove = useRemoveExclusion(campaign.id);
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState, reset } = useForm<CreateExclusionInput>({ resolver: zodResolver(createExclusionSchema) });

  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      // Resolves once the campaign's and its site's figures have been fetched again (api/mutations.ts).
      await add.mutateAsync(input);
      reset();
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "The exclusion could not be saved. Try again.");
    }
  });

  const onRemove = async (exclusionId: number) => {
    setFailure(null);
    try {
      await remove.mutateAsync(exclusionId);
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "The exclusion could not be removed. Try again.");
    }
  };

  const fieldError = (name: keyof CreateExclusionInput) => formState.errors[name]?.message;

  return (
    <section aria-labelledby="exclusions-heading" className="space-y-3">
      <h2 id="exclusions-heading" className="text-lg font-semibold">
        Excluded time windows
      </h2>
      <p className="text-sm text-ink-soft">Samples inside a window (from ≤ time &lt; to, UTC) leave every figure and chart, for example during dome maintenance or while the monitor was misaligned.</p>
      {campaign.exclusions.length === 0 ? (
        <p className="rounded-lg border border-line bg-panel p-3 text-sm">No windows are excluded: every accepted sample counts.</p>
      ) : (
        <ul className="divide-y divide-line rounded-lg border border-line bg-panel">
          {campaign.exclusions.map((exclusion) => (
            <li key={exclusion.id} className="flex flex-wrap items-center justify-between gap-3 px-3 py-2 text-sm">
              <span>
                <span className="font-semibold tabular-nums">
                  {formatDateTimeUtc(exclusion.from)} → {formatDateTimeUtc(exclusion.to)}
                </span>
                <span className="block text-ink-soft">
                  {exclusion.reason} · added by {exclusion.createdBy.name}
                </span>
              </span>
              {campaign.can.exclude ? (
                <button type="button" onClick={() => void onRemove(exclusion.id)} className="rounded-md border border-line px-3 py-1 font-semibold hover:bg-bad-pale">
                  Remove
                </button>
              ) : null}
            </li>
          ))}
        </ul>
      )}
      {campaign.can.exclude ? (
        <form onSubmit={onSubmit} noValidate className="grid gap-3 rounded-lg border border-line bg-panel p-3 sm:grid-cols-2 lg:grid-cols-[1fr_1fr_2fr_auto] lg:items-start">
          {(
            [
              ["from", "From (UTC)", "datetime-local"],
              ["to", "To (UTC)", "datetime-local"],
              ["reason", "Reason", "text"],
            ] as const
          ).map(([name, label, type]) => (
            <div key={name}>
              <label htmlFor={`exclusion-${name}`} className="block text-sm font-semibold">
                {label}
              </label>
              <input
                id={`exclusion-${name}`}
                type={type}
                placeholder={name === "reason" ? "e.g. dome maintenance" : undefined}
                className="mt-1 w-full rounded-md border border-line px-2 py-1.5"
                aria-invalid={fieldError(name) ? true : undefined}
                aria-describedby={fieldError(name) ? `exclusion-${name}-error` : undefined}
                {...register(name)}
              />
              {fieldError(name) ? (
                <p id={`exclusion-${name}-error`} className="mt-1 text-xs text-bad">
                  {fieldError(name)}
                </p>
              ) : null}
            </div>
          ))}
          <button type="submit" disabled={formState.isSubmitting} className="self-end justify-self-start rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-60 lg:mt-6">
            Exclude window
          </button>
        </form>
      ) : null}
      <Problem text={failure} />
    </section>
  );
}
