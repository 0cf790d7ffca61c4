// Every client-side route of the app, in one place.
export const paths = {
  home: "/",
  signIn: "/sign-in",
  forgotPassword: "/forgot-password",
  resetPassword: "/reset-password",
  acceptInvitation: "/accept-invitation",
  program: (programId: string) => `/programs/${programId}`,
  materials: "/materials",
  people: "/people",
  audit: "/audit",
  outbox: "/outbox",
  release: (releaseId: string) => `/releases/${releaseId}`,
  newDesign: (programId: string) => `/designs/new?program=${encodeURIComponent(programId)}`,
  design: (designId: string) => `/designs/${designId}`,
  revision: (designId: string, revisionId: string) => `/designs/${designId}/revisions/${revisionId}`,
  compare: (designId: string, a: string, b: string) => `/designs/${designId}/compare?a=${a}&b=${b}`,
} as const;
