import { PageNotFound } from "@/components/route/route-states";

export const metadata = { title: "Not found" };

export default function NotFound() {
  return <PageNotFound />;
}
