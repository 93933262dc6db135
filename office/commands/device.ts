/**
 * `shearfield device add NAME | list | revoke NAME-or-id [--data DIR]`:
 * the tablets allowed to sync with the office store.
 */
import { parseArgs } from 'node:util';
import { InputError } from '../../core/shared/errors';
import type { Command, CommandIO } from '../command';
import { DEFAULT_DATA_DIR, OfficeStore } from '../store';

const HELP = `Usage:
  shearfield device add NAME [--data DIR]        Register a tablet; prints its token ONCE.
  shearfield device list [--data DIR]            List devices: id, name, added, last batch, revoked.
  shearfield device revoke NAME-or-id [--data DIR]  Stop a device's token from working, at once.
  shearfield device revoke --id N | --name NAME     The same, saying which: a word that is one
                                                    device's id and another's name is refused.

The office keeps only the SHA-256 of each token, so a lost token cannot be shown again:
revoke the device and add it again under a new name. Enter the token and the office
address in the app's sync settings; every sync call sends it as "Authorization: Bearer TOKEN".

Options:
  --data DIR  Folder of the office store (created by add if missing). Default ${DEFAULT_DATA_DIR}.
  --id N      (revoke) The device with this id.
  --name NAME (revoke) The device with this name.
  -h, --help  Show this help.`;

const device: Command = {
  name: 'device',
  summary: 'Add, list or revoke the tablets allowed to sync with the office store.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      options: { data: { type: 'string', default: DEFAULT_DATA_DIR }, id: { type: 'string' }, name: { type: 'string' } },
      allowPositionals: true,
      strict: true,
    });
    const [action, ...rest] = positionals;
    if (action !== 'add' && action !== 'list' && action !== 'revoke') {
      throw new InputError('action', `Say what to do: shearfield device add NAME, device list or device revoke NAME (got ${action === undefined ? 'nothing' : JSON.stringify(action)}).`);
    }
    if ((values.id !== undefined || values.name !== undefined) && action !== 'revoke') {
      throw new InputError(values.id !== undefined ? '--id' : '--name', `--id and --name go with device revoke only.`);
    }
    if (values.id !== undefined && values.name !== undefined) throw new InputError('--id', 'Give --id or --name, not both.');
    const chosen = values.id !== undefined ? { id: values.id } : values.name !== undefined ? { name: values.name } : undefined;
    if (chosen && rest.length !== 0) throw new InputError('NAME', `device revoke takes ${values.id !== undefined ? '--id' : '--name'} or one device name or id, not both.`);
    const wantsName = action !== 'list' && !chosen;
    if (wantsName && rest.length !== 1) {
      throw new InputError('NAME', `device ${action} takes one device name${action === 'revoke' ? ' or id' : ''} (quote a name with spaces), but ${rest.length} were given.`);
    }
    if (!wantsName && rest.length !== 0) throw new InputError('list', 'device list takes no further words.');
    const store = OfficeStore.open(values.data!, { create: action === 'add' });
    try {
      if (action === 'add') {
        const d = store.addDevice(rest[0]);
        io.out(
          [
            `Added device ${d.id}: ${d.name}`,
            `Token (shown once; the office keeps only its SHA-256):`,
            ``,
            `  ${d.token}`,
            ``,
            `Enter it with the office address in the app's sync settings.`,
            ``,
          ].join('\n'),
        );
      } else if (action === 'list') {
        const rows = store.listDevices();
        if (rows.length === 0) {
          io.out(`No devices yet. Add one: shearfield device add NAME --data ${values.data}\n`);
        } else {
          const table = [['id', 'name', 'added', 'last batch', 'state'], ...rows.map((d) => [String(d.id), d.name, d.createdAt, d.lastBatchAt ?? '-', d.revokedAt ? `revoked ${d.revokedAt}` : 'active'])];
          const widths = table[0].map((_, i) => Math.max(...table.map((r) => r[i].length)));
          io.out(table.map((r) => r.map((c, i) => c.padEnd(widths[i])).join('  ').trimEnd()).join('\n') + '\n');
        }
      } else {
        const target = store.findDevice(chosen ?? rest[0]);
        if (target.revokedAt) {
          io.out(`Device ${target.id}: ${target.name} was already revoked (since ${target.revokedAt}); nothing changed.\n`);
        } else {
          const d = store.revokeDevice({ id: String(target.id) });
          io.out(`Revoked device ${d.id}: ${d.name} (added ${d.createdAt}, last batch ${d.lastBatchAt ?? 'none'}, revoked ${d.revokedAt}). Its token no longer works.\n`);
        }
      }
    } finally {
      store.close();
    }
    return 0;
  },
};

export default device;
