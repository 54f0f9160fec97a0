import { redirect } from "next/navigation";
import { pageContext } from "@/lib/auth/guard";

export default async function AdminIndex() {
  await pageContext(["admin"], "/admin");
  redirect("/admin/users");
}
