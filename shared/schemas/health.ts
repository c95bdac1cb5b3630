import { z } from "zod";

export const healthSchema = z
  .object({ status: z.enum(["ok", "unavailable"]), database: z.enum(["ok", "unreachable"]) })
  .meta({ id: "Health" });
