// Every client-side route of the app, in one place.
export const paths = {
  home: "/",
  signIn: "/sign-in",
} as const;
