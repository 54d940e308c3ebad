import { existsSync, mkdirSync } from "node:fs";
import { join } from "node:path";
import { writeSyntheticLog } from "@calmcrest/seeing-stats/node";
import type { ResponseSetName } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { monitorOf } from "../store/index";
import { acceptUpload } from "../uploads/accept-upload.server";
import { hashIntoTemporary } from "../uploads/raw-files.server";

// The demo scenario: an invented survey consortium choosing among four candidate ridges in a dry, high mountain
// range of the southern hemisphere. Every name, coordinate and number here is invented. The logs are written with
// a fixed seed under <dataDir>/demo-logs/ and go through the same upload and ingest path as a person's file.

interface DemoLog {
  file: string;
  seed: number;
  startDate: string;
  nights: number;
  uploadedBy: "lead" | "engineer";
}

interface DemoCampaign {
  name: string;
  apertureMm: number;
  baselineMm: number;
  wavelengthNm: number;
  pixelScaleArcsec?: number;
  heightAboveGroundM: number;
  response: ResponseSetName;
  startDate: string;
  endDate: string;
  status: "running" | "finished";
  medianSeeingArcsec: number;
  seasonalAmplitude: number;
  engineerIsMember: boolean;
  logs: DemoLog[];
  exclusion?: { from: string; to: string; reason: string };
}

interface DemoSite {
  name: string;
  latitude: number;
  longitude: number;
  elevationM: number;
  notes: string;
  campaigns: DemoCampaign[];
}

export const DEMO_SITES: DemoSite[] = [
  {
    name: "Tern Ridge",
    latitude: -25.812,
    longitude: -68.431,
    elevationM: 4380,
    notes: "Broad north–south ridge; the access track washes out after summer storms.",
    campaigns: [
      {
        name: "Tern Ridge north mast",
        apertureMm: 60,
        baselineMm: 200,
        wavelengthNm: 500,
        heightAboveGroundM: 6,
        response: "z-tilt",
        startDate: "2025-03-01",
        endDate: "2025-12-31",
        status: "finished",
        medianSeeingArcsec: 0.72,
        seasonalAmplitude: 0.12,
        engineerIsMember: true,
        logs: [
          { file: "tern-north-2025a.csv", seed: 1101, startDate: "2025-03-01", nights: 150, uploadedBy: "engineer" },
          { file: "tern-north-2025b.csv", seed: 1102, startDate: "2025-07-29", nights: 150, uploadedBy: "engineer" },
        ],
        exclusion: { from: "2025-05-12T00:00:00Z", to: "2025-05-15T00:00:00Z", reason: "Dome maintenance: shutter motor replaced" },
      },
      {
        name: "Tern Ridge low tower",
        apertureMm: 60,
        baselineMm: 200,
        wavelengthNm: 500,
        heightAboveGroundM: 2,
        response: "z-tilt",
        startDate: "2025-08-01",
        endDate: "2026-01-27",
        status: "finished",
        medianSeeingArcsec: 0.86,
        seasonalAmplitude: 0.12,
        engineerIsMember: false,
        logs: [{ file: "tern-low-2025.csv", seed: 1201, startDate: "2025-08-01", nights: 180, uploadedBy: "lead" }],
      },
    ],
  },
  {
    name: "Saltpan Crest",
    latitude: -25.947,
    longitude: -68.702,
    elevationM: 4115,
    notes: "Low crest above the salt flat; afternoon dust.",
    campaigns: [
      {
        name: "Saltpan Crest tower",
        apertureMm: 60,
        baselineMm: 200,
        wavelengthNm: 550,
        heightAboveGroundM: 8,
        response: "z-tilt",
        startDate: "2025-04-01",
        endDate: "2025-11-26",
        status: "finished",
        medianSeeingArcsec: 0.95,
        seasonalAmplitude: 0.1,
        engineerIsMember: true,
        logs: [{ file: "saltpan-2025.csv", seed: 2101, startDate: "2025-04-01", nights: 240, uploadedBy: "engineer" }],
      },
    ],
  },
  {
    name: "Quartz Shoulder",
    latitude: -26.105,
    longitude: -68.377,
    elevationM: 4620,
    notes: "Highest candidate; a narrow shoulder under the main summit.",
    campaigns: [
      {
        name: "Quartz Shoulder pier",
        apertureMm: 60,
        baselineMm: 200,
        wavelengthNm: 500,
        heightAboveGroundM: 5,
        response: "sarazin-roddier",
        startDate: "2025-03-15",
        endDate: "2025-12-10",
        status: "running",
        medianSeeingArcsec: 0.62,
        seasonalAmplitude: 0.15,
        engineerIsMember: false,
        logs: [{ file: "quartz-2025.csv", seed: 3101, startDate: "2025-03-15", nights: 270, uploadedBy: "lead" }],
      },
      {
        // A second monitor for the southern summer, on the same nights as Tern Ridge's low tower: the pair of
        // campaigns the Compare page can set side by side night by night.
        name: "Quartz Shoulder summer mast",
        apertureMm: 60,
        baselineMm: 200,
        wavelengthNm: 500,
        heightAboveGroundM: 5,
        response: "z-tilt",
        startDate: "2025-12-11",
        endDate: "2026-01-27",
        status: "finished",
        medianSeeingArcsec: 0.66,
        seasonalAmplitude: 0.15,
        engineerIsMember: false,
        logs: [{ file: "quartz-summer-2025.csv", seed: 3201, startDate: "2025-12-11", nights: 48, uploadedBy: "lead" }],
      },
    ],
  },
  {
    name: "Condor Spur",
    latitude: -25.69,
    longitude: -68.915,
    elevationM: 3940,
    notes: "Lowest and easiest to reach; spur exposed to the westerlies.",
    campaigns: [
      {
        name: "Condor Spur mast",
        apertureMm: 60,
        baselineMm: 200,
        wavelengthNm: 500,
        pixelScaleArcsec: 0.85,
        heightAboveGroundM: 3,
        response: "z-tilt",
        startDate: "2025-05-01",
        endDate: "2025-11-26",
        status: "finished",
        medianSeeingArcsec: 1.08,
        seasonalAmplitude: 0.08,
        engineerIsMember: false,
        logs: [{ file: "condor-2025.csv", seed: 4101, startDate: "2025-05-01", nights: 210, uploadedBy: "lead" }],
      },
    ],
  },
];

async function userIdByEmail(context: AppContext, email: string): Promise<string> {
  const id = await context.store.users.idByEmail(email);
  if (!id) throw new Error(`The demo user ${email} is missing; the demo users are seeded first.`);
  return id;
}

/**
 * Seeds the demo scenario and waits until every demo log is ingested. `nightsScale` shortens every log
 * (tests use a small scale; the real seed uses 1). Every step goes through the store and the upload path a
 * person's request takes, so the demo data has the same rows and audit entries as data entered by hand.
 */
export async function seedDemoScenario(context: AppContext, options: { nightsScale?: number } = {}): Promise<void> {
  const { store } = context;
  const scale = options.nightsScale ?? 1;
  const leadId = await userIdByEmail(context, "lead@calmcrest.test");
  const engineerId = await userIdByEmail(context, "engineer@calmcrest.test");
  const logDir = join(context.env.dataDir, "demo-logs");
  mkdirSync(logDir, { recursive: true });
  const demo = { demo: true };

  for (const demoSite of DEMO_SITES) {
    const siteId = await store.sites.create(
      leadId,
      { name: demoSite.name, latitude: demoSite.latitude, longitude: demoSite.longitude, elevationM: demoSite.elevationM, notes: demoSite.notes },
      demo,
    );

    for (const demoCampaign of demoSite.campaigns) {
      const campaignId = await store.campaigns.create(
        leadId,
        siteId,
        {
          name: demoCampaign.name,
          monitor: {
            apertureMm: demoCampaign.apertureMm,
            baselineMm: demoCampaign.baselineMm,
            wavelengthNm: demoCampaign.wavelengthNm,
            ...(demoCampaign.pixelScaleArcsec === undefined ? {} : { pixelScaleArcsec: demoCampaign.pixelScaleArcsec }),
            heightAboveGroundM: demoCampaign.heightAboveGroundM,
            response: demoCampaign.response,
          },
          startDate: demoCampaign.startDate,
          endDate: demoCampaign.endDate,
          status: demoCampaign.status,
        },
        demo,
      );
      const campaign = await store.campaigns.require(campaignId);
      if (demoCampaign.engineerIsMember) await store.memberships.add(null, campaign.id, engineerId, demo);

      for (const log of demoCampaign.logs) {
        const nights = Math.max(2, Math.round(log.nights * scale));
        const path = join(logDir, scale === 1 ? log.file : `scaled-${nights}-${log.file}`);
        if (!existsSync(path)) {
          await writeSyntheticLog(path, {
            seed: log.seed,
            site: { latitudeDeg: demoSite.latitude, longitudeDeg: demoSite.longitude, elevationM: demoSite.elevationM },
            startDate: log.startDate,
            nights,
            medianSeeingArcsec: demoCampaign.medianSeeingArcsec,
            seasonalAmplitude: demoCampaign.seasonalAmplitude,
            monitor: monitorOf(campaign),
            // A few damaged rows per file, as real logs have.
            badRowEvery: 7919,
            weatherLossFraction: 0.22,
          });
        }
        const file = await hashIntoTemporary(context.env.dataDir, path);
        await acceptUpload(context, {
          campaign,
          userId: log.uploadedBy === "lead" ? leadId : engineerId,
          file,
          fileName: log.file,
          mapping: undefined,
        });
      }

      if (demoCampaign.exclusion) await store.exclusions.add(engineerId, campaign.id, demoCampaign.exclusion, demo);
    }
  }
  await context.ingest.idle();
}
