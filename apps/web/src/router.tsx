import type { ComponentType } from "react";
import type { QueryClient } from "@tanstack/react-query";
import { createBrowserRouter, redirect, type LoaderFunctionArgs, type RouteObject } from "react-router-dom";
import { meQuery } from "./api/auth";
import { NAV_ITEMS, homeFor, mayUse } from "./navigation";
import { requireMe, roleLoader } from "./route-guards";
import { AppLayout } from "./routes/_app";
import { RouteError } from "./routes/route-error";
import { SignInPage } from "./routes/sign-in";
import { configQuery, sitesQuery } from "./api/sites";
import { userQuery, usersQuery } from "./api/users";
import { outboxQuery } from "./api/outbox";
import { preferencesQuery, reportCommentsQuery, reportQuery, reportsQuery } from "./api/reports";
import { idParam } from "./route-loaders";
import { auditFiltersFrom, auditQuery } from "./api/audit";
import { campaignLoader, siteLoader } from "./route-loaders";
import { loadCompareCharts, loadSeeingCharts, loadSiteMap } from "./components/on-demand";

const FIELD_ROLES = ["admin", "lead", "engineer"] as const;
const REPORT_ROLES = ["admin", "lead", "committee"] as const;

/**
 * A page's code, split per screen (loaders stay in the main bundle), with the code of the large parts it shows (the
 * map, the charts) fetched beside it rather than after it has rendered, yet in no page's first load.
 */
function pageCode<Module>(load: () => Promise<Module>, component: (module: Module) => ComponentType, ...alongside: (() => Promise<unknown>)[]) {
  return async () => {
    for (const start of alongside) void start();
    return { Component: component(await load()) };
  };
}

/** Signed-in pages other areas add (sites, campaigns, upload, people): see DEVELOPERS.md "Add a page". */
export function appRoutes(queryClient: QueryClient): RouteObject[] {
  const fieldGuard = roleLoader(queryClient, FIELD_ROLES);
  /** The map pages (sites, compare): the site list and the map settings. */
  const sitesLoader = async (args: LoaderFunctionArgs) => {
    await fieldGuard(args);
    await Promise.all([queryClient.ensureQueryData(sitesQuery), queryClient.ensureQueryData(configQuery)]);
    return null;
  };
  return [
    { path: "sites", loader: sitesLoader, lazy: pageCode(() => import("./routes/sites"), (page) => page.SitesPage, loadSiteMap) },
    { path: "sites/:siteId", loader: siteLoader(queryClient), lazy: pageCode(() => import("./routes/sites.$siteId"), (page) => page.SitePage, loadSeeingCharts) },
    {
      path: "campaigns/:campaignId",
      loader: campaignLoader(queryClient),
      lazy: pageCode(() => import("./routes/campaigns.$campaignId"), (page) => page.CampaignPage, loadSeeingCharts),
    },
    { path: "compare", loader: sitesLoader, lazy: pageCode(() => import("./routes/compare"), (page) => page.ComparePage, loadSiteMap, loadCompareCharts) },
    {
      path: "upload",
      loader: async (args) => {
        await roleLoader(queryClient, ["lead", "engineer"])(args);
        await queryClient.ensureQueryData(sitesQuery);
        return null;
      },
      lazy: async () => ({ Component: (await import("./routes/upload")).UploadPage }),
    },
    {
      path: "admin/people",
      loader: async (args) => {
        await roleLoader(queryClient, ["admin"])(args);
        await Promise.all([queryClient.ensureQueryData(usersQuery), queryClient.ensureQueryData(sitesQuery)]);
        return null;
      },
      lazy: async () => ({ Component: (await import("./routes/admin.people")).PeoplePage }),
    },
    {
      path: "admin/outbox",
      loader: async (args) => {
        await roleLoader(queryClient, ["admin"])(args);
        await queryClient.ensureQueryData(outboxQuery);
        return null;
      },
      lazy: async () => ({ Component: (await import("./routes/admin.outbox")).OutboxPage }),
    },
    {
      path: "reports",
      loader: async (args) => {
        await roleLoader(queryClient, REPORT_ROLES)(args);
        const me = await requireMe(queryClient, args.request);
        // The new-report form lists sites for leads and admins.
        await Promise.all([queryClient.ensureQueryData(reportsQuery), me.role === "committee" ? null : queryClient.ensureQueryData(sitesQuery)]);
        return null;
      },
      lazy: async () => ({ Component: (await import("./routes/reports")).ReportsPage }),
    },
    {
      path: "reports/:reportId",
      loader: async (args) => {
        await roleLoader(queryClient, REPORT_ROLES)(args);
        const me = await requireMe(queryClient, args.request);
        const reportId = idParam(args.params.reportId);
        const detail = await queryClient.ensureQueryData(reportQuery(reportId));
        if (me.role !== "committee") void queryClient.prefetchQuery(sitesQuery);
        if (detail.version) void queryClient.prefetchQuery(reportCommentsQuery(reportId));
        return null;
      },
      // A report is read and printed with its charts: its page waits for their code too.
      lazy: async () => {
        const [page] = await Promise.all([import("./routes/reports.$reportId"), loadCompareCharts()]);
        return { Component: page.ReportPage };
      },
    },
    {
      path: "account",
      loader: async ({ request }) => {
        await requireMe(queryClient, request);
        await queryClient.ensureQueryData(preferencesQuery);
        return null;
      },
      lazy: async () => ({ Component: (await import("./routes/account")).AccountPage }),
    },
    {
      path: "admin/people/:userId",
      loader: async (args) => {
        await roleLoader(queryClient, ["admin"])(args);
        await Promise.all([queryClient.ensureQueryData(userQuery(args.params.userId ?? "")), queryClient.ensureQueryData(usersQuery)]);
        return null;
      },
      lazy: async () => ({ Component: (await import("./routes/admin.people.$userId")).PersonPage }),
    },
    {
      path: "admin/audit",
      loader: async (args) => {
        await roleLoader(queryClient, ["admin"])(args);
        const filters = auditFiltersFrom(new URL(args.request.url).searchParams);
        await Promise.all([queryClient.ensureQueryData(auditQuery(filters)), queryClient.ensureQueryData(usersQuery)]);
        return null;
      },
      lazy: async () => ({ Component: (await import("./routes/admin.audit")).AuditPage }),
    },
  ];
}

/** Shown while the first page's data loads (before the app shell can draw). */
function LoadingPage() {
  return (
    <p role="status" className="p-6 text-ink-soft">
      Loading Calmcrest…
    </p>
  );
}

export function createRouter(queryClient: QueryClient) {
  return createBrowserRouter([
    {
      path: "/sign-in",
      loader: async () => {
        const me = await queryClient.ensureQueryData(meQuery);
        return me ? redirect(homeFor(me.role)) : null;
      },
      element: <SignInPage />,
      hydrateFallbackElement: <LoadingPage />,
    },
    // The pages an e-mail link opens: no session needed (the link is the credential).
    { path: "/set-password", lazy: async () => ({ Component: (await import("./routes/set-password")).SetPasswordPage }), hydrateFallbackElement: <LoadingPage /> },
    { path: "/reset-password", lazy: async () => ({ Component: (await import("./routes/reset-password")).ResetPasswordPage }), hydrateFallbackElement: <LoadingPage /> },
    {
      path: "/",
      loader: ({ request }) => requireMe(queryClient, request),
      element: <AppLayout />,
      errorElement: <RouteError />,
      hydrateFallbackElement: <LoadingPage />,
      children: [
        {
          errorElement: <RouteError />,
          children: [
            {
              index: true,
              loader: async ({ request }) => redirect(homeFor((await requireMe(queryClient, request)).role)),
            },
            ...appRoutes(queryClient),
            {
              path: "*",
              loader: async ({ request }) => {
                // A known screen that this role may not use reads "not for your role"; anything else is simply not there.
                const me = await requireMe(queryClient, request);
                const path = new URL(request.url).pathname;
                const known = NAV_ITEMS.some((item) => path === item.to || path.startsWith(`${item.to}/`));
                if (known && !mayUse(me.role, path)) throw new Response("Not for your role", { status: 403 });
                throw new Response("Not found", { status: 404 });
              },
            },
          ],
        },
      ],
    },
  ]);
}
