import { createBrowserRouter } from "react-router-dom";
import { AccountPage } from "../features/account/AccountPage";
import { BoundaryPage } from "../features/boundary/BoundaryPage";
import { CodebookPage } from "../features/codebook/CodebookPage";
import { ImportsPage } from "../features/imports/ImportsPage";
import { TraitTablePage } from "../features/trait-table/TraitTablePage";
import { ThreadPage } from "../features/threads/ThreadPage";
import { ThreadsPage } from "../features/threads/ThreadsPage";
import { ForgotPasswordPage } from "../features/auth/ForgotPasswordPage";
import { ResetPasswordPage } from "../features/auth/ResetPasswordPage";
import { SignInPage } from "../features/auth/SignInPage";
import { SignUpPage } from "../features/auth/SignUpPage";
import { InvitationPage } from "../features/invitations/InvitationPage";
import { MembersPage } from "../features/members/MembersPage";
import { ComparisonPage } from "../features/modern-comparison/ComparisonPage";
import { ComparisonReportPage } from "../features/modern-comparison/ComparisonReportPage";
import { CrosswalkPage } from "../features/modern-comparison/CrosswalkPage";
import { ModernComparisonPage } from "../features/modern-comparison/ModernComparisonPage";
import { OutboxPage } from "../features/outbox/OutboxPage";
import { RunComparePage } from "../features/runs/RunComparePage";
import { RunsPage } from "../features/runs/RunsPage";
import { RunReportPage } from "../features/selectivity/RunReportPage";
import { SelectivityPage } from "../features/selectivity/SelectivityPage";
import { NewStudyPage } from "../features/studies/NewStudyPage";
import { StudiesPage } from "../features/studies/StudiesPage";
import { StudyOverviewPage } from "../features/study-overview/StudyOverviewPage";
import { AppShell } from "./AppShell";
import { NotFoundPage } from "./NotFoundPage";
import { PUBLIC_ROUTES } from "./publicRoutes";
import { PublicLayout } from "./PublicLayout";
import { RouteErrorPage } from "./RouteErrorPage";
import { StudyLayout } from "./StudyLayout";

export const router = createBrowserRouter([
  {
    errorElement: <RouteErrorPage />,
    children: [
      {
        element: <PublicLayout />,
        children: [
          { path: PUBLIC_ROUTES.signIn, element: <SignInPage /> },
          { path: PUBLIC_ROUTES.signUp, element: <SignUpPage /> },
          { path: PUBLIC_ROUTES.forgotPassword, element: <ForgotPasswordPage /> },
          { path: PUBLIC_ROUTES.resetPassword, element: <ResetPasswordPage /> },
          { path: PUBLIC_ROUTES.invitation, element: <InvitationPage /> },
          { path: "*", element: <NotFoundPage /> },
        ],
      },
      // A printable report stands on a page of its own, without the app's frame.
      { path: "studies/:studyId/modern-comparison/comparisons/:comparisonId/report", element: <ComparisonReportPage /> },
      { path: "studies/:studyId/runs/:runId/report", element: <RunReportPage /> },
      {
        element: <AppShell />,
        children: [
          { index: true, element: <StudiesPage /> },
          { path: "studies/new", element: <NewStudyPage /> },
          {
            path: "studies/:studyId",
            element: <StudyLayout />,
            children: [
              { index: true, element: <StudyOverviewPage /> },
              { path: "table", element: <TraitTablePage /> },
              { path: "codebook", element: <CodebookPage /> },
              { path: "imports", element: <ImportsPage /> },
              { path: "boundary", element: <BoundaryPage /> },
              { path: "selectivity", element: <SelectivityPage /> },
              { path: "runs", element: <RunsPage /> },
              { path: "runs/compare", element: <RunComparePage /> },
              { path: "modern-comparison", element: <ModernComparisonPage /> },
              { path: "modern-comparison/lists/:listId", element: <CrosswalkPage /> },
              { path: "modern-comparison/comparisons/:comparisonId", element: <ComparisonPage /> },
              { path: "threads", element: <ThreadsPage /> },
              { path: "threads/:threadId", element: <ThreadPage /> },
              { path: "members", element: <MembersPage /> },
            ],
          },
          { path: "account", element: <AccountPage /> },
          { path: "outbox", element: <OutboxPage /> },
        ],
      },
    ],
  },
]);
