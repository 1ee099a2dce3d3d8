// Placeholder-free minimal set-up; the PostgreSQL start is added by the foundation.
export default async function setup() {}
