"use client";

import useSWR from "swr";
import Link from "next/link";
import { useSearchParams } from "next/navigation";
import { format } from "date-fns";
import { swrFetcher } from "@/lib/fetcher";
import { Loading, LoadError } from "@/components/ui/data-state";

interface AuditPage {
  total: number;
  page: number;
  page_size: number;
  items: { id: number; at: string; actor: string; action: string; entity_type: string; entity_id: string | null; details: Record<string, unknown> }[];
}

export function AuditLogTable() {
  const params = useSearchParams();
  const page = Math.max(1, Number(params.get("page") ?? 1) || 1);
  const { data, error, isLoading, mutate } = useSWR<AuditPage>(`/api/audit?page=${page}`, swrFetcher, { refreshInterval: 15000 });
  const pages = data ? Math.max(1, Math.ceil(data.total / data.page_size)) : 1;
  return (
    <section className="card overflow-x-auto">
      {isLoading && <Loading />}
      {error && <LoadError error={error} retry={() => mutate()} />}
      {data && (
        <>
          <table className="table-dense w-full">
            <thead>
              <tr><th scope="col">When</th><th scope="col">Who</th><th scope="col">Action</th><th scope="col">What</th><th scope="col">Details</th></tr>
            </thead>
            <tbody>
              {data.items.map((e) => (
                <tr key={e.id}>
                  <td className="figures whitespace-nowrap">{format(new Date(e.at), "yyyy-MM-dd HH:mm:ss")}</td>
                  <td>{e.actor}</td>
                  <td>{e.action}</td>
                  <td>{e.entity_type}</td>
                  <td className="max-w-md truncate text-muted" title={JSON.stringify(e.details)}>{JSON.stringify(e.details)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <nav aria-label="Pages" className="flex items-center gap-3 p-3 text-sm">
            <span className="figures">Page {data.page} of {pages}</span>
            {page > 1 && <Link className="btn-quiet md:h-8" href={`?page=${page - 1}`}>Previous</Link>}
            {page < pages && <Link className="btn-quiet md:h-8" href={`?page=${page + 1}`}>Next</Link>}
          </nav>
        </>
      )}
    </section>
  );
}
