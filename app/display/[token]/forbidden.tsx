import { DisplayRevoked } from "@/components/board/display-revoked";

export default function DisplayLinkRevoked() {
  return <DisplayRevoked />;
}
