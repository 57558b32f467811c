import { clubSettingsSchema } from "@/features/catalogue";
import { getClubSettings, getClubSettingsForEdit, updateClubSettings } from "@/features/catalogue/server";
import { SettingsForm, type SettingsState } from "@/features/catalogue/components/settings-form";
import { getPageActor } from "@/features/members/server";
import { PageTitle } from "@/features/shared/components/ui";
import { pageData } from "@/features/shared/server/page";
import { When } from "@/features/shared/components/when";
import { formatDayTime } from "@/features/shared/format-time";
import { canEditClubSettings } from "@/features/shared/policies";

export const metadata = { title: "Club settings" };

/** A server action is a public endpoint: updateClubSettings checks the caller; the early answer is only kinder. */
async function saveSettings(prev: SettingsState, form: FormData): Promise<SettingsState> {
  "use server";
  const actor = await getPageActor();
  if (!canEditClubSettings(actor))
    return { ...prev, ok: false, message: "Only club officers (admins) may change the settings.", fieldErrors: {} };
  const raw = Object.fromEntries(form.entries());
  const parsed = clubSettingsSchema.safeParse(raw);
  if (!parsed.success) {
    const fieldErrors = Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message]));
    return { ...prev, ok: false, message: "Some settings need fixing; nothing was changed.", fieldErrors };
  }
  const before = await getClubSettings();
  const saved = await updateClubSettings(actor, parsed.data);
  const recomputing = saved.confidenceLevel !== before.confidenceLevel || saved.minReports !== before.minReports;
  const message = recomputing
    ? "Saved. Every summary is being recomputed with the new settings; the evidence pages show them within a few seconds."
    : "Saved.";
  return { ok: true, message, fieldErrors: {}, values: saved };
}

export default async function SettingsPage() {
  const s = await pageData(getClubSettingsForEdit({ actor: await getPageActor() }));
  return (
    <div className="grid gap-6">
      <PageTitle lead="These apply to every summary; changing the confidence level or the minimum recomputes them all.">
        Club settings
      </PageTitle>
      <SettingsForm action={saveSettings} initial={{ ok: true, message: null, fieldErrors: {}, values: s }} />
      <section aria-labelledby="backups-heading" className="grid max-w-xl gap-2">
        <h2 id="backups-heading" className="text-lg font-bold">
          Backups
        </h2>
        <p>
          {s.nightlyBackup ? (
            s.lastNightlyBackupAt ? (
              <>
                The last nightly backup started <When at={s.lastNightlyBackupAt} relative /> (
                {formatDayTime(s.lastNightlyBackupAt)}).
              </>
            ) : (
              "Nightly backups are on; the first runs after 03:00 server time."
            )
          ) : (
            "Nightly backups are off."
          )}{" "}
          A backup can be taken at any time while the club runs; restoring one is described in the operations guide.
        </p>
        <p>
          {/* A plain link: the browser downloads the archive with the admin's session. */}
          <a href="/api/admin/backup" className="font-bold text-peat-700 underline" download>
            Download a backup now
          </a>
        </p>
      </section>
    </div>
  );
}
