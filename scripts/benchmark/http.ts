// Signing in as a person would: POST /sign-in with the server's own Origin, keeping the
// session cookie for every later request of that simulated person.

/** Signs in and returns the Cookie header value to send with later requests. */
export async function signIn(origin: string, email: string, password: string): Promise<string> {
  const response = await fetch(`${origin}/sign-in`, {
    method: "POST",
    redirect: "manual",
    headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: origin },
    body: new URLSearchParams({ email, password, redirectTo: "" }),
  });
  await response.arrayBuffer();
  const cookie = response.headers.getSetCookie().find((c) => c.startsWith("blindcut_session="));
  if (response.status !== 302 || !cookie) throw new Error(`sign-in of ${email} answered ${response.status} without a session cookie`);
  return cookie.split(";")[0];
}

/** Signs many people in, a few at a time (password hashing is deliberately slow). */
export async function signInAll(origin: string, emails: readonly string[], password: string, concurrency = 4): Promise<string[]> {
  const cookies: string[] = new Array(emails.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: concurrency }, async () => {
      while (next < emails.length) {
        const i = next++;
        cookies[i] = await signIn(origin, emails[i], password);
      }
    }),
  );
  return cookies;
}

/** GET a page signed in; throws unless it answers 200 with every expected text. */
export async function expectPage(origin: string, pathname: string, cookie: string | null, expected: readonly string[]) {
  const response = await fetch(`${origin}${pathname}`, { redirect: "manual", headers: cookie ? { Cookie: cookie } : {} });
  const body = await response.text();
  if (response.status !== 200) throw new Error(`${pathname} answered ${response.status}`);
  for (const text of expected) if (!body.includes(text)) throw new Error(`${pathname} does not show “${text}”`);
  return body.length;
}
