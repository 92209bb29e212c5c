/**
 * What `npx millrace --help` and `npx millrace <command> --help` print: every
 * command, every option of it with one line on what it is, and the formats
 * its values take. Everything is wrapped to 80 columns (lib/cli/help.test.ts
 * checks the width, and that each option a command parses is listed here).
 */
import { REQUIRED_TELEMETRY_FIELDS } from '@/lib/contract/telemetry';

/** Width the help wraps to. */
export const HELP_WIDTH = 80;

export interface OptionHelp {
  /** `--nameplate` */
  flag: string;
  /** The value's placeholder (`UNIT.json`); absent for a switch. */
  value?: string;
  required?: boolean;
  /** May be given more than once. */
  repeatable?: boolean;
  /** One line on what it is. */
  text: string;
}

export interface CommandHelp {
  /** As typed after `millrace`: `check`, `units import`. */
  name: string;
  /** One line for the list of commands. */
  summary: string;
  /** Positional arguments, in order. */
  arguments?: ReadonlyArray<{ name: string; text: string }>;
  options: readonly OptionHelp[];
  /** Paragraphs after the options: formats the values take, what the output is. */
  notes?: readonly string[];
}

const TIME_FORMATS =
  'TIME is an ISO-8601 time with an offset (2026-03-01T00:00:00Z, ' +
  '2026-03-01T06:30+01:00), a date (2026-03-01, meaning midnight UTC) or epoch ' +
  'milliseconds (1772323200000). --from is inclusive, --to exclusive; without ' +
  'them the export runs from the first stored sample to the last.';

const LOG_FORMAT =
  'UNIT.json is a nameplate of the data contract. LOG.csv has a header row of ' +
  `telemetry field names in any order (${REQUIRED_TELEMETRY_FIELDS.join(', ')} at least); ts is an ` +
  'ISO-8601 time with an offset or epoch milliseconds. `npx millrace export` ' +
  'writes this format.';

const DATABASE_NOTE =
  'Uses DATABASE_URL when it is set, else the embedded database in DATA_DIR ' +
  '(./data); while a running `npm start` holds that folder it refuses and says so.';

/** Every command of `npx millrace`, in the order the help lists them. */
export const COMMAND_HELP: Record<string, CommandHelp> = {
  check: {
    name: 'check',
    summary: "diagnose a unit's log against its nameplate (Ke, unbalance, speed sensor); no database needed",
    options: [
      { flag: '--nameplate', value: 'UNIT.json', required: true, text: "the unit's nameplate, a JSON file" },
      { flag: '--log', value: 'LOG.csv', required: true, text: 'the log, a CSV file (see below)' },
      { flag: '--json', text: 'print one JSON object instead of the readable report' },
    ],
    notes: [
      LOG_FORMAT,
      'Exit status 0 when the analysis ran, whatever the verdict; 2 when it could not ' +
        '(a file missing or unreadable, a required column absent, a nameplate that fails ' +
        'its schema). Single bad rows are skipped and counted in a finding.',
    ],
  },
  energy: {
    name: 'energy',
    summary: 'energy yield of a log per calendar month',
    options: [
      { flag: '--nameplate', value: 'UNIT.json', required: true, text: "the unit's nameplate, a JSON file" },
      { flag: '--log', value: 'LOG.csv', required: true, text: 'the log, a CSV file (see below)' },
      { flag: '--tz', value: 'ZONE', text: 'time zone of the calendar months (default UTC)' },
      { flag: '--json', text: 'print one JSON object instead of the readable table' },
    ],
    notes: [
      LOG_FORMAT,
      'ZONE is an IANA time zone name such as Europe/Oslo, America/Vancouver or UTC; ' +
        'months begin at local midnight of the 1st in that zone.',
    ],
  },
  'units import': {
    name: 'units import',
    summary: 'register or update sites and units from a fleet file, all or nothing',
    arguments: [{ name: 'FLEET.json', text: 'the fleet file, JSON (see below)' }],
    options: [],
    notes: [
      'FLEET.json is { "sites": [ { "id", "name", "timezone" } ], "units": [ nameplate, ... ] }, ' +
        'timezone an IANA name such as Europe/Oslo, each unit a nameplate of the data contract.',
      'Sites and units are matched by id. Everything is checked first: if any entry is ' +
        'invalid nothing changes, every problem is printed with its path and the exit ' +
        'status is 2.',
      DATABASE_NOTE,
    ],
  },
  export: {
    name: 'export',
    summary: "write a unit's stored samples as a CSV log on standard output",
    options: [
      { flag: '--unit', value: 'SITE/UNIT', required: true, text: 'the unit, by its site id and unit id' },
      { flag: '--from', value: 'TIME', text: 'first time to export (inclusive)' },
      { flag: '--to', value: 'TIME', text: 'time to stop at (exclusive)' },
    ],
    notes: [
      TIME_FORMATS,
      'The output is the CSV log `check` and `energy` read: ts in ISO-8601 UTC, empty cells for absent values.',
      DATABASE_NOTE,
    ],
  },
  'device credentials': {
    name: 'device credentials',
    summary: "issue a unit's MQTT username and password, or rotate its password; shown once",
    arguments: [{ name: 'SITE/UNIT', text: 'the unit, by its site id and unit id' }],
    options: [{ flag: '--json', text: 'print { "username", "password" } instead of the readable text' }],
    notes: [
      'The username is SITE.UNIT; the password is 128 random bits, stored only as a ' +
        'hash. Rotating cuts off a device connected to the embedded broker with the ' +
        'old password at once. The device may publish only to ' +
        'millrace/SITE/UNIT/telemetry and millrace/SITE/UNIT/presence.',
      'On Mosquitto, run device export-broker-auth again and reload the broker.',
      DATABASE_NOTE,
    ],
  },
  'user add': {
    name: 'user add',
    summary: 'add a person who can sign in; the password is read from standard input',
    options: [
      { flag: '--email', value: 'E', required: true, text: 'their e-mail address, which they sign in with' },
      { flag: '--role', value: 'ROLE', required: true, text: 'admin, operator, crew or owner' },
      { flag: '--site', value: 'SITE', repeatable: true, text: 'a site id a crew member or owner sees (at least one for them)' },
    ],
    notes: [
      'Roles: admin does everything, people included; operator sees all sites, ' +
        'changes setup and acknowledges alerts; crew sees their sites and ' +
        'acknowledges alerts; owner sees their sites, read only.',
      'The password is one line of standard input (not shown on a terminal; or ' +
        "printf '%s\\n' \"$PW\" | npx millrace user add ...): at least 12 characters, " +
        'no other rules; a common password is refused with the reason.',
      DATABASE_NOTE,
    ],
  },
  'token create': {
    name: 'token create',
    summary: "print a new API token of a person once; it carries their role and sites",
    options: [
      { flag: '--email', value: 'E', required: true, text: 'the person whose token it is' },
      { flag: '--name', value: 'N', text: 'what will use it, shown on their page (default: command line)' },
      { flag: '--json', text: 'print { "token" } instead of the readable text' },
    ],
    notes: [
      'Send it as the header Authorization: Bearer <token> to /api/v1. Only a ' +
        "hash is kept; revoke it on the person's page (People).",
      DATABASE_NOTE,
    ],
  },
  'device revoke': {
    name: 'device revoke',
    summary: "revoke a unit's MQTT account (a lost or stolen device)",
    arguments: [{ name: 'SITE/UNIT', text: 'the unit, by its site id and unit id' }],
    options: [],
    notes: [
      'The account can no longer connect; a device connected to the embedded ' +
        'broker is cut off at once. device credentials issues a new password and ' +
        'brings the account back. On Mosquitto, export again and reload the broker.',
      DATABASE_NOTE,
    ],
  },
  'device export-broker-auth': {
    name: 'device export-broker-auth',
    summary: "write Mosquitto's password file and ACL file from the accounts",
    options: [{ flag: '--dir', value: 'DIR', required: true, text: 'folder to write passwords and acl in (made if missing)' }],
    notes: [
      'DIR/passwords (mode 0600) holds each unit account that is not revoked with ' +
        "its stored hash, in Mosquitto's own format; DIR/acl (0644) lets each unit " +
        'write only its own telemetry and presence topics and read nothing.',
      "The ingesters' account is MQTT_USERNAME with MQTT_PASSWORD (at least 16 " +
        'characters) from the environment, the two variables the ingesters read; it ' +
        "may read every unit's telemetry and presence and write nothing.",
      'Point password_file and acl_file of mosquitto.conf at them, with ' +
        'allow_anonymous false. Export again after adding units or issuing or ' +
        'rotating credentials, then reload Mosquitto (SIGHUP) so it reads them.',
      DATABASE_NOTE,
    ],
  },
  'webhook add': {
    name: 'webhook add',
    summary: 'add an address that alerts are posted to, signed; prints its secret once',
    options: [
      { flag: '--url', value: 'URL', required: true, text: 'the http:// or https:// address the messages are posted to' },
      { flag: '--site', value: 'SITE', text: "only this site's alerts (default: every site)" },
      { flag: '--min-severity', value: 'S', text: 'info, warning or alarm: the least severe sent (default warning)' },
      { flag: '--json', text: 'print { "id", "url", "siteId", "minSeverity", "secret" }' },
    ],
    notes: [
      'Each change of an alert (opened, acknowledged, cleared, reopened, shelved, ' +
        'unshelved) is one JSON POST { "type", "timestamp", "data": alert }, signed as ' +
        'the Standard Webhooks specification says: headers webhook-id, webhook-timestamp ' +
        'and webhook-signature, keyed with the secret (whsec_ and base64). A refused or ' +
        'unanswered message is sent again with the same webhook-id, 5 s, 10 s, 20 s ... ' +
        'at most 10 minutes apart, for 24 hours.',
      'The secret is kept, as signing needs it, but shown only here.',
      DATABASE_NOTE,
    ],
  },
  'webhook list': {
    name: 'webhook list',
    summary: 'list the webhook endpoints and what their queues hold',
    options: [{ flag: '--json', text: 'print a JSON array instead of the readable list' }],
    notes: ['Shows each id, address, site and least severity, and its messages queued, delivered and given up; never the secret.', DATABASE_NOTE],
  },
  'webhook disable': {
    name: 'webhook disable',
    summary: 'stop posting alerts to one webhook endpoint',
    arguments: [{ name: 'ID', text: 'the endpoint, by the id webhook list shows' }],
    options: [],
    notes: ['Its messages not yet delivered are given up, with the reason kept.', DATABASE_NOTE],
  },
};

/** The command-line's help option, listed in every command's help. */
const HELP_OPTION: OptionHelp = { flag: '--help', text: 'show this help (also -h)' };

/** Words of `text` in lines of at most `width` columns; the first line starts with `first`, the others with `rest`. */
export function wrap(text: string, width: number = HELP_WIDTH, first = '', rest = first): string[] {
  return wrapTokens(text.split(/\s+/).filter(Boolean), width, first, rest, ' ');
}

function wrapTokens(tokens: readonly string[], width: number, first: string, rest: string, gap: string): string[] {
  const lines: string[] = [];
  let line = first;
  let empty = true;
  for (const token of tokens) {
    if (!empty && line.length + gap.length + token.length > width) {
      lines.push(line);
      line = rest;
      empty = true;
    }
    line += (empty ? '' : gap) + token;
    empty = false;
  }
  if (!empty || lines.length === 0) lines.push(line);
  return lines;
}

function optionToken(o: OptionHelp): string {
  const core = o.value ? `${o.flag} ${o.value}` : o.flag;
  const shown = o.repeatable ? `${core} ...` : core;
  return o.required ? shown : `[${shown}]`;
}

/** `millrace check --nameplate UNIT.json ...` as tokens (an option and its value stay on one line). */
function synopsisTokens(c: CommandHelp): string[] {
  return ['millrace', c.name, ...(c.arguments ?? []).map((a) => a.name), ...c.options.map(optionToken)];
}

/** The synopsis after `prefix`, wrapped: continuation lines indented under the command's first option. */
export function synopsis(c: CommandHelp, prefix = '', width = HELP_WIDTH): string[] {
  const hang = ' '.repeat(prefix.length + `millrace ${c.name} `.length);
  return wrapTokens(synopsisTokens(c), width, prefix, hang, ' ');
}

/** Two columns: left padded to the widest entry, right wrapped under itself. */
function table(rows: ReadonlyArray<[string, string]>, indent = '  '): string[] {
  const left = Math.max(...rows.map(([l]) => l.length));
  const out: string[] = [];
  for (const [l, r] of rows) {
    const head = `${indent}${l.padEnd(left)}  `;
    out.push(...wrap(r, HELP_WIDTH, head, ' '.repeat(head.length)));
  }
  return out;
}

/** The help of one command. */
export function commandHelpText(c: CommandHelp): string {
  const lines = [...synopsis(c, 'usage: npx '), ''];
  lines.push(...wrap(`${c.summary.charAt(0).toUpperCase()}${c.summary.slice(1)}.`));
  if (c.arguments && c.arguments.length > 0) {
    lines.push('', 'arguments:', ...table(c.arguments.map((a) => [a.name, a.text])));
  }
  const options = [...c.options, HELP_OPTION];
  lines.push('', 'options:', ...table(options.map((o) => [o.value ? `${o.flag} ${o.value}` : o.flag, `${o.text}${o.required ? ' (required)' : ''}`])));
  for (const note of c.notes ?? []) lines.push('', ...wrap(note));
  return `${lines.join('\n')}\n`;
}

/** The help of `npx millrace --help`. */
export function helpText(): string {
  const lines = [
    ...wrap('millrace: health and energy of small permanent-magnet wind and hydro generators'),
    '',
    'usage: npx millrace <command> [options]',
    '       npx millrace <command> --help    every option of that command',
    '',
    'commands:',
  ];
  for (const c of Object.values(COMMAND_HELP)) {
    lines.push(...synopsis(c, '  '));
    lines.push(...wrap(c.summary, HELP_WIDTH, '      '));
  }
  lines.push(
    '',
    ...wrap('Exit status: 0 when the command ran, 2 when it could not (a bad file, column or option).'),
    ...wrap('Database commands (units import, export, device, user, token, webhook) use DATABASE_URL when it is set, else the embedded database in DATA_DIR (./data).'),
    '',
  );
  return lines.join('\n');
}
