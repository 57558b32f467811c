import Forbidden from "@/app/forbidden";

export const metadata = { title: "Not allowed" };

// The same words the framework's forbidden() fallback shows; this address is where layouts redirect.
export default Forbidden;
