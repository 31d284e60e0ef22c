// Any /api/ address without a resource route answers JSON, not the HTML not-found page.
export function loader() {
  return Response.json({ error: "No such resource." }, { status: 404 });
}

export function action() {
  return Response.json({ error: "No such resource." }, { status: 404 });
}
