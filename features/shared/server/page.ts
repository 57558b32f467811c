import "server-only";
import { forbidden, notFound, unauthorized } from "next/navigation";
import { AppError } from "../errors";

/**
 * For pages: awaits a data function and turns its refusal into the framework's answer — 401
 * (unauthorized()), 403 (forbidden()) or 404 (notFound()) — whatever the page's layout does.
 */
export async function pageData<T>(load: Promise<T>): Promise<T> {
  try {
    return await load;
  } catch (err) {
    if (err instanceof AppError) {
      if (err.code === "unauthenticated") unauthorized();
      if (err.code === "forbidden") forbidden();
      if (err.code === "not_found") notFound();
    }
    throw err;
  }
}
