import { useEffect, useId, useRef, useState, type ReactNode } from "react";
import { ROLE_LABELS, ROLES, roleChangeEffects, type AccountStatus, type Role, type UserListItem } from "@calmcrest/contracts";
import { ApiError } from "../api/client";
import { usePatchUser } from "../api/mutations";
import { Problem } from "./page";

// Pieces of the administration screens: the role-change confirmation, the "saved" note with its undo, and the
// account status badge. A role never changes on a key press or a click in a list: it changes only when the
// administrator confirms in the dialog, which says what the person gains and loses.

export const messageOf = (error: unknown, fallback: string) => (error instanceof ApiError ? error.message : fallback);

const STATUS_LABELS: Record<AccountStatus, string> = { active: "Active", invited: "Invited, no password yet", deactivated: "Deactivated" };

export function StatusBadge({ status }: { status: AccountStatus }) {
  if (status === "active") return null;
  const tone = status === "deactivated" ? "bg-bad-pale text-bad" : "bg-warn-pale text-warn";
  return <span className={`ml-2 inline-block rounded px-1.5 py-0.5 text-xs font-semibold ${tone}`}>{STATUS_LABELS[status]}</span>;
}

/** Why a role cannot be changed here, or null when it can. */
export function roleLock(user: UserListItem, everyone: readonly UserListItem[]): string | null {
  if (user.status === "deactivated") return "Reactivate the account to change its role.";
  const otherActiveAdmins = everyone.filter((other) => other.id !== user.id && other.role === "admin" && other.status === "active");
  if (user.role === "admin" && otherActiveAdmins.length === 0) {
    return "Locked: the last active administrator keeps this role, so someone can always manage accounts. Make another person an administrator first.";
  }
  return null;
}

/** A short-lived note that a change was saved, with an undo button for a few seconds. */
export interface SavedNote {
  id: number;
  text: string;
  undo?: () => Promise<void>;
}

export const UNDO_SECONDS = 10;

export function SavedBanner({ note, onDone, onProblem }: { note: SavedNote | null; onDone: () => void; onProblem: (message: string) => void }) {
  const [secondsLeft, setSecondsLeft] = useState(UNDO_SECONDS);
  const [undone, setUndone] = useState<string | null>(null);
  const [working, setWorking] = useState(false);
  useEffect(() => {
    setSecondsLeft(UNDO_SECONDS);
    setUndone(null);
    if (!note) return;
    const timer = window.setInterval(() => setSecondsLeft((left) => left - 1), 1000);
    return () => window.clearInterval(timer);
  }, [note]);
  useEffect(() => {
    if (note && secondsLeft <= -5) onDone();
  }, [note, secondsLeft, onDone]);
  // One live region that is always present, so screen readers announce each new note.
  return (
    <div role="status" aria-live="polite" className="min-h-0">
      {note ? (
        <div className="flex flex-wrap items-center gap-3 rounded-md border border-good/40 bg-accent-pale px-3 py-2 text-sm text-accent-strong">
          <span className="font-semibold">{undone ?? `Saved. ${note.text}`}</span>
          {note.undo && !undone && secondsLeft > 0 ? (
            <button
              type="button"
              disabled={working}
              className="rounded-md border border-accent bg-panel px-3 py-1 font-semibold text-accent hover:bg-accent-pale disabled:opacity-60"
              onClick={async () => {
                if (!note.undo) return;
                setWorking(true);
                try {
                  await note.undo();
                  setUndone("Undone: the change was reversed.");
                } catch (error) {
                  onProblem(messageOf(error, "The change could not be undone. Change it back by hand."));
                } finally {
                  setWorking(false);
                }
              }}
            >
              Undo ({secondsLeft} s)
            </button>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}

function Effects({ title, items, tone }: { title: string; items: string[]; tone: "gain" | "lose" }) {
  return (
    <div>
      <p className="font-semibold">{title}</p>
      {items.length === 0 ? (
        <p className="text-ink-soft">Nothing.</p>
      ) : (
        <ul className={`ml-5 list-disc ${tone === "lose" ? "text-bad" : ""}`}>
          {items.map((item) => (
            <li key={item}>{item}</li>
          ))}
        </ul>
      )}
    </div>
  );
}

/**
 * "Change role…": a button that opens a modal dialog (focus stays inside; Escape cancels). Choosing a role there
 * only shows what changes; nothing is saved until "Change role" is pressed. Afterwards `onSaved` receives a note
 * with an undo.
 */
export function ChangeRoleButton({
  user,
  isSelf,
  lock,
  onSaved,
  onProblem,
  children,
}: {
  user: UserListItem;
  isSelf: boolean;
  lock: string | null;
  onSaved: (note: Omit<SavedNote, "id">) => void;
  onProblem: (message: string | null) => void;
  children?: ReactNode;
}) {
  const dialog = useRef<HTMLDialogElement>(null);
  const headingId = useId();
  const [choice, setChoice] = useState<Role>(user.role);
  const [saving, setSaving] = useState(false);
  const [failure, setFailure] = useState<string | null>(null);
  const changeRole = usePatchUser();
  const effects = roleChangeEffects(user.role, choice);

  const open = () => {
    setChoice(user.role);
    setFailure(null);
    dialog.current?.showModal();
    // Start on the current role, so the arrow keys move away from it.
    dialog.current?.querySelector<HTMLInputElement>(`input[type="radio"][value="${user.role}"]`)?.focus();
  };
  const confirm = async () => {
    setSaving(true);
    setFailure(null);
    onProblem(null);
    const from = user.role;
    try {
      await changeRole.mutateAsync({ userId: user.id, patch: { role: choice } });
      dialog.current?.close();
      onSaved({
        text: `${user.name} is now ${ROLE_LABELS[choice]} (was ${ROLE_LABELS[from]}).`,
        undo: async () => {
          await changeRole.mutateAsync({ userId: user.id, patch: { role: from, undo: true } });
        },
      });
    } catch (error) {
      setFailure(messageOf(error, "The role could not be changed. Try again."));
    } finally {
      setSaving(false);
    }
  };

  return (
    <>
      <span className="inline-flex flex-wrap items-center gap-2">
        <span>{ROLE_LABELS[user.role]}</span>
        {lock ? null : (
          <button type="button" onClick={open} aria-label={`Change role of ${user.name}`} className="rounded-md border border-line px-2 py-0.5 text-xs font-semibold text-accent hover:bg-accent-pale">
            Change role…
          </button>
        )}
      </span>
      {lock ? <span className="mt-1 block text-xs text-ink-soft">{lock}</span> : null}
      {children}
      <dialog ref={dialog} aria-labelledby={headingId} className="m-auto w-[min(34rem,calc(100vw-2rem))] rounded-lg border border-line bg-panel p-0 text-ink shadow-xl backdrop:bg-night/50">
        <form
          method="dialog"
          className="space-y-4 p-5"
          onSubmit={(event) => {
            event.preventDefault();
            void confirm();
          }}
        >
          <h2 id={headingId} className="text-lg font-semibold">
            Change the role of {user.name}
          </h2>
          <fieldset>
            <legend className="text-sm font-semibold">New role</legend>
            <div className="mt-2 grid gap-1 sm:grid-cols-2">
              {ROLES.map((role) => (
                <label key={role} className="flex items-center gap-2 rounded-md border border-line px-2 py-1.5">
                  <input type="radio" name="role" value={role} checked={choice === role} onChange={() => setChoice(role)} />
                  <span>
                    {ROLE_LABELS[role]}
                    {role === user.role ? <span className="text-ink-soft"> (now)</span> : null}
                  </span>
                </label>
              ))}
            </div>
          </fieldset>
          {choice === user.role ? (
            <p className="text-sm text-ink-soft">Choose a different role to see what changes for {user.name}.</p>
          ) : (
            <div className="space-y-2 rounded-md bg-paper p-3 text-sm" aria-live="polite">
              <p>
                {user.name} goes from <strong>{ROLE_LABELS[user.role]}</strong> to <strong>{ROLE_LABELS[choice]}</strong>, from their next page on.
              </p>
              <Effects title="Gains" items={effects.gains} tone="gain" />
              <Effects title="Loses" items={effects.loses} tone="lose" />
              {isSelf && choice !== "admin" ? <p className="font-semibold text-bad">This is your own account: you lose this page as soon as you confirm.</p> : null}
              {choice === "engineer" && user.campaigns.length === 0 ? <p>As a field engineer they see no site until you add them to a campaign.</p> : null}
            </div>
          )}
          <Problem text={failure} />
          <div className="flex flex-wrap justify-end gap-2">
            <button type="button" onClick={() => dialog.current?.close()} className="rounded-md border border-line px-4 py-1.5 font-semibold">
              Cancel
            </button>
            <button type="submit" disabled={saving || choice === user.role} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-50">
              {choice === user.role ? "Change role" : `Change role to ${ROLE_LABELS[choice]}`}
            </button>
          </div>
        </form>
      </dialog>
    </>
  );
}

/** A button that asks first, in a modal dialog with the consequences written out. */
export function ConfirmButton({
  label,
  title,
  consequences,
  confirmLabel,
  tone = "normal",
  action,
}: {
  label: string;
  title: string;
  consequences: ReactNode;
  confirmLabel: string;
  tone?: "normal" | "danger";
  action: () => Promise<void>;
}) {
  const dialog = useRef<HTMLDialogElement>(null);
  const headingId = useId();
  const [failure, setFailure] = useState<string | null>(null);
  const [working, setWorking] = useState(false);
  const danger = tone === "danger";
  return (
    <>
      <button
        type="button"
        onClick={() => {
          setFailure(null);
          dialog.current?.showModal();
        }}
        className={`rounded-md border px-3 py-1.5 text-sm font-semibold ${danger ? "border-bad/50 text-bad hover:bg-bad-pale" : "border-line text-accent hover:bg-accent-pale"}`}
      >
        {label}
      </button>
      <dialog ref={dialog} aria-labelledby={headingId} className="m-auto w-[min(32rem,calc(100vw-2rem))] rounded-lg border border-line bg-panel p-0 text-ink shadow-xl backdrop:bg-night/50">
        <div className="space-y-4 p-5">
          <h2 id={headingId} className="text-lg font-semibold">
            {title}
          </h2>
          <div className="text-sm">{consequences}</div>
          <Problem text={failure} />
          <div className="flex flex-wrap justify-end gap-2">
            <button type="button" onClick={() => dialog.current?.close()} className="rounded-md border border-line px-4 py-1.5 font-semibold">
              Cancel
            </button>
            <button
              type="button"
              disabled={working}
              onClick={async () => {
                setWorking(true);
                setFailure(null);
                try {
                  await action();
                  dialog.current?.close();
                } catch (error) {
                  setFailure(messageOf(error, "That did not work. Try again."));
                } finally {
                  setWorking(false);
                }
              }}
              className={`rounded-md px-4 py-1.5 font-semibold text-white disabled:opacity-50 ${danger ? "bg-bad hover:opacity-90" : "bg-accent hover:bg-accent-strong"}`}
            >
              {confirmLabel}
            </button>
          </div>
        </div>
      </dialog>
    </>
  );
}
