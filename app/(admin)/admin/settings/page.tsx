import { getClubSettingsForEdit } from "@/features/catalogue/server";
import { SettingsForm } from "@/features/catalogue/components/settings-form";
import { getPageActor } from "@/features/members/server";
import { PageTitle } from "@/features/shared/components/ui";
import { pageData } from "@/features/shared/server/page";
import { When } from "@/features/shared/components/when";
import { formatDayTime } from "@/features/shared/format-time";

export const metadata = { title: "Club settings" };

export default async function SettingsPage() {
  const s = await pageData(getClubSettingsForEdit({ actor: await getPageActor() }));
  return (
    <div className="grid gap-6">
      <PageTitle lead="These apply to every summary; changing the confidence level or the minimum recomputes them all.">
        Club settings
      </PageTitle>
      {/* The form saves through PATCH /api/admin/settings, where updateClubSettings checks the caller. */}
      <SettingsForm
        initial={{
          name: s.name,
          confidenceLevel: s.confidenceLevel,
          minReports: s.minReports,
          defaultVolumeUnit: s.defaultVolumeUnit,
          defaultTemperatureUnit: s.defaultTemperatureUnit,
          firstDoseFraction: s.firstDoseFraction,
          nightlyBackup: s.nightlyBackup,
        }}
      />
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
