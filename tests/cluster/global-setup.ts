import { ensureBuild } from "@/db/cluster";

// One production build for the suite, made only when missing or older than a source file (as `npm start` decides).
export default async function setup(): Promise<void> {
  await ensureBuild();
}
