import { ensureBuild } from "@/db/cluster";

// One production build for the suite: rebuilt unless TANKLORE_REUSE_BUILD=1 says the existing .next is current.
export default function setup(): void {
  ensureBuild(process.env.TANKLORE_REUSE_BUILD !== "1");
}
