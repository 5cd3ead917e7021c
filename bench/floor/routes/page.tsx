/** The floor's page: a loader with a little data, rendered on the server as a document. */
import { useLoaderData } from "react-router";

export function loader() {
  return { title: "Floor", items: ["sphere", "fluid lot", "column"] };
}

export default function Page() {
  const { title, items } = useLoaderData<typeof loader>();
  return (
    <main>
      <h1>{title}</h1>
      <ul>
        {items.map((item) => (
          <li key={item}>{item}</li>
        ))}
      </ul>
    </main>
  );
}
