import type { ComponentType } from "react";
import { createBrowserRouter, type RouteObject } from "react-router-dom";
import { LoadingState } from "../components/LoadingState";
import { NotFoundPage } from "./NotFoundPage";
import { PUBLIC_ROUTES } from "./publicRoutes";
import { PublicLayout } from "./PublicLayout";
import { RouteErrorPage } from "./RouteErrorPage";
import { boundaryDataLoader, onEnteringOnly, overviewDataLoader, studiesDataLoader } from "./screenData";

/**
 * Every screen is a chunk of its own, fetched on the first visit, so the sign-in page carries neither
 * the charts nor the grid. A navigation keeps the current page until the next screen's chunk is in.
 */
const screen =
  <Name extends string>(load: () => Promise<Record<Name, ComponentType>>, name: Name) =>
  () =>
    load().then((module) => ({ Component: module[name] }));

const routes: RouteObject[] = [
  {
    errorElement: <RouteErrorPage />,
    // Shown once, while the first screen's chunk arrives.
    hydrateFallbackElement: <LoadingState label="Opening Stratasieve" lines={0} className="mx-auto max-w-md px-4 py-16" />,
    children: [
      {
        element: <PublicLayout />,
        children: [
          { path: PUBLIC_ROUTES.signIn, lazy: screen(() => import("../features/auth/SignInPage"), "SignInPage") },
          { path: PUBLIC_ROUTES.signUp, lazy: screen(() => import("../features/auth/SignUpPage"), "SignUpPage") },
          { path: PUBLIC_ROUTES.forgotPassword, lazy: screen(() => import("../features/auth/ForgotPasswordPage"), "ForgotPasswordPage") },
          { path: PUBLIC_ROUTES.resetPassword, lazy: screen(() => import("../features/auth/ResetPasswordPage"), "ResetPasswordPage") },
          { path: PUBLIC_ROUTES.invitation, lazy: screen(() => import("../features/invitations/InvitationPage"), "InvitationPage") },
          { path: "*", element: <NotFoundPage /> },
        ],
      },
      // A printable report stands on a page of its own, without the app's frame.
      { path: "studies/:studyId/modern-comparison/comparisons/:comparisonId/report", lazy: screen(() => import("../features/modern-comparison/ComparisonReportPage"), "ComparisonReportPage") },
      { path: "studies/:studyId/runs/:runId/report", lazy: screen(() => import("../features/selectivity/RunReportPage"), "RunReportPage") },
      { path: "studies/:studyId/boundary/report", lazy: screen(() => import("../features/boundary/BoundaryReportPage"), "BoundaryReportPage") },
      {
        lazy: screen(() => import("./AppShell"), "AppShell"),
        children: [
          { index: true, loader: studiesDataLoader, shouldRevalidate: onEnteringOnly, lazy: screen(() => import("../features/studies/StudiesPage"), "StudiesPage") },
          { path: "studies/new", lazy: screen(() => import("../features/studies/NewStudyPage"), "NewStudyPage") },
          {
            path: "studies/:studyId",
            lazy: screen(() => import("./StudyLayout"), "StudyLayout"),
            children: [
              {
                index: true,
                loader: overviewDataLoader,
                shouldRevalidate: onEnteringOnly,
                lazy: screen(() => import("../features/study-overview/StudyOverviewPage"), "StudyOverviewPage"),
              },
              { path: "table", lazy: screen(() => import("../features/trait-table/TraitTablePage"), "TraitTablePage") },
              { path: "codebook", lazy: screen(() => import("../features/codebook/CodebookPage"), "CodebookPage") },
              { path: "codebook/time-bins", lazy: screen(() => import("../features/time-bins/TimeBinsPage"), "TimeBinsPage") },
              { path: "imports", lazy: screen(() => import("../features/imports/ImportsPage"), "ImportsPage") },
              {
                path: "boundary",
                loader: boundaryDataLoader,
                shouldRevalidate: onEnteringOnly,
                lazy: screen(() => import("../features/boundary/BoundaryPage"), "BoundaryPage"),
              },
              { path: "selectivity", lazy: screen(() => import("../features/selectivity/SelectivityPage"), "SelectivityPage") },
              { path: "runs", lazy: screen(() => import("../features/runs/RunsPage"), "RunsPage") },
              { path: "runs/compare", lazy: screen(() => import("../features/runs/RunComparePage"), "RunComparePage") },
              { path: "modern-comparison", lazy: screen(() => import("../features/modern-comparison/ModernComparisonPage"), "ModernComparisonPage") },
              { path: "modern-comparison/lists/:listId", lazy: screen(() => import("../features/modern-comparison/CrosswalkPage"), "CrosswalkPage") },
              { path: "modern-comparison/comparisons/:comparisonId", lazy: screen(() => import("../features/modern-comparison/ComparisonPage"), "ComparisonPage") },
              { path: "threads", lazy: screen(() => import("../features/threads/ThreadsPage"), "ThreadsPage") },
              { path: "threads/:threadId", lazy: screen(() => import("../features/threads/ThreadPage"), "ThreadPage") },
              { path: "members", lazy: screen(() => import("../features/members/MembersPage"), "MembersPage") },
            ],
          },
          { path: "account", lazy: screen(() => import("../features/account/AccountPage"), "AccountPage") },
          { path: "outbox", lazy: screen(() => import("../features/outbox/OutboxPage"), "OutboxPage") },
        ],
      },
    ],
  },
];

/** The app's router. Creating it starts fetching the first screen's chunks (see providers.tsx). */
export const createAppRouter = () => createBrowserRouter(routes);
