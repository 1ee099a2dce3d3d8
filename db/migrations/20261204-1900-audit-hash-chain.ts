/**
 * Tamper-evident audit trail: every `audit_log` row carries `prev_hash` and
 * `hash = sha256(canonical text of the row, including prev_hash)`, computed by a BEFORE INSERT
 * trigger so every writer is covered. Inserts are serialised on the one-row `audit_chain_head`
 * (SELECT … FOR UPDATE, held to commit), and the row id is drawn under that lock, so id order is
 * chain order and the chain cannot fork. Existing rows are chained here in id order.
 *
 * The canonical text is `jsonb_build_object(…)::text`: jsonb prints keys in a fixed order with
 * fixed spacing, so the same content always gives the same bytes. `audit_log_canonical` is also
 * what the verifier (src/lib/core/audit-chain.ts) reads, hashing it itself in Node.
 * `audit_verifications` keeps the outcome of each verification run (shown on the admin screen).
 */
import { sql, type Migration } from './types.ts';

export const migration: Migration = {
  name: '20261204-1900-audit-hash-chain',
  async up(ctx) {
    await sql(
      ctx,
      `
      alter table audit_log add column prev_hash bytea, add column hash bytea;
      create function audit_log_canonical(r audit_log, prev bytea) returns text
        language sql stable as $$
        select jsonb_build_object(
          'id', r.id,
          'at', to_char(r.at at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"'),
          'actorId', r.actor_id,
          'actor', r.actor_label,
          'action', r.action,
          'entity', r.entity,
          'entityId', r.entity_id,
          'before', r.before,
          'after', r.after,
          'address', r.address,
          'signature', r.signature,
          'prev', encode(prev, 'hex')
        )::text
      $$;
      create table audit_chain_head (
        singleton boolean primary key default true check (singleton),
        last_id bigint,
        last_hash bytea
      );
      do $$
      declare
        r audit_log;
        prev bytea := null;
        h bytea;
        last bigint := null;
      begin
        alter table audit_log disable trigger audit_log_no_update;
        for r in select * from audit_log order by id loop
          h := sha256(convert_to(audit_log_canonical(r, prev), 'UTF8'));
          update audit_log set prev_hash = prev, hash = h where id = r.id;
          prev := h;
          last := r.id;
        end loop;
        alter table audit_log enable trigger audit_log_no_update;
        insert into audit_chain_head(singleton, last_id, last_hash) values (true, last, prev);
      end $$;
      -- Security definer: runs as the table owner, so a writer needs only INSERT on audit_log.
      create function audit_log_chain() returns trigger language plpgsql security definer set search_path = public as $$
      declare
        prev bytea;
      begin
        -- One writer at a time: the head row stays locked until this transaction ends.
        select last_hash into prev from audit_chain_head where singleton for update;
        if not found then
          raise exception 'audit_chain_head is missing' using errcode = 'data_exception';
        end if;
        -- Drawn under the lock, so ids follow the chain (an id taken before the lock is skipped).
        new.id := nextval(pg_get_serial_sequence('audit_log', 'id'));
        new.prev_hash := prev;
        new.hash := sha256(convert_to(audit_log_canonical(new, prev), 'UTF8'));
        update audit_chain_head set last_id = new.id, last_hash = new.hash where singleton;
        return new;
      end $$;
      create trigger audit_log_chain before insert on audit_log
        for each row execute function audit_log_chain();
      create table audit_verifications (
        id bigserial primary key,
        at timestamptz not null default now(),
        actor_label text not null,
        ok boolean not null,
        rows_checked bigint not null,
        last_id bigint,
        last_hash bytea,
        broken_id bigint,
        problem text
      );
      `,
    );
  },
  async down(ctx) {
    await sql(
      ctx,
      `
      drop table audit_verifications;
      drop trigger audit_log_chain on audit_log;
      drop function audit_log_chain();
      drop table audit_chain_head;
      drop function audit_log_canonical(audit_log, bytea);
      alter table audit_log drop column hash, drop column prev_hash;
      `,
    );
  },
};
