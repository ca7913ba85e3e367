import { Link } from "react-router";

const messages: Record<number, { title: string; text: string }> = {
  400: { title: "That request could not be read", text: "Check what you entered and try again." },
  403: { title: "Not for your role", text: "Your role in this lab does not include this page. Ask the lab's owner if you need it." },
  404: { title: "Nothing here", text: "This page does not exist, or it belongs to a lab you are not a member of." },
  409: { title: "That changed meanwhile", text: "Someone else changed this first. Reload and try again." },
  500: { title: "Something broke on our side", text: "The error is logged. Try again in a moment." },
};

export function ErrorPage({ status, detail, stack }: { status: number; detail?: string; stack?: string }) {
  const message = messages[status] ?? { title: `Error ${status}`, text: "The request could not be completed." };
  return (
    <section className="mx-auto max-w-2xl py-16" aria-labelledby="error-title">
      <p className="figures text-sm font-bold tracking-widest text-graphite-600">ERROR {status}</p>
      <h1 id="error-title" className="mt-2 text-3xl font-bold">{message.title}</h1>
      <p className="mt-4 text-lg text-graphite-800">{detail ?? message.text}</p>
      {stack ? (
        <pre className="mt-6 overflow-x-auto rounded border border-rule bg-card p-4 text-xs">{stack}</pre>
      ) : null}
      <p className="mt-8">
        <Link to="/" className="font-bold">Back to the start page</Link>
      </p>
    </section>
  );
}
