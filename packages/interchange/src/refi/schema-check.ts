/**
 * Test support: validation against the standard's schema with xmllint-wasm (libxml2 built to
 * WebAssembly, no native build). `Project.xsd` is the schema as published, licence header intact
 * (fixtures/Project.xsd). No codebook schema was published beside it (NOTES.md): the .qdc schema is
 * derived from Project.xsd here — same types, the codebook namespace, a `CodeBook` root with `Codes`,
 * optional `Sets` and `origin`, and sets whose `MemberCode` names its code with `@guid` (spec §5.2).
 */
import { readFileSync } from 'node:fs';
import { validateXML } from 'xmllint-wasm';

const here = new URL('./fixtures/', import.meta.url);

export function projectSchema(): string {
  return readFileSync(new URL('Project.xsd', here), 'utf8');
}

export function codebookSchema(): string {
  const extra = `
	<xsd:element name="CodeBook" type="CodeBookFileType"/>
	<xsd:complexType name="CodeBookFileType">
		<xsd:sequence>
			<xsd:element name="Codes" type="CodesType"/>
			<xsd:element name="Sets" type="CodeBookSetsType" minOccurs="0"/>
		</xsd:sequence>
		<xsd:attribute name="origin" type="xsd:string"/>
	</xsd:complexType>
	<xsd:complexType name="CodeBookSetsType">
		<xsd:sequence>
			<xsd:element name="Set" type="CodeBookSetType" maxOccurs="unbounded"/>
		</xsd:sequence>
	</xsd:complexType>
	<xsd:complexType name="CodeBookSetType">
		<xsd:sequence>
			<xsd:element name="Description" type="xsd:string" minOccurs="0"/>
			<xsd:element name="MemberCode" type="CodeBookMemberType" minOccurs="0" maxOccurs="unbounded"/>
		</xsd:sequence>
		<xsd:attribute name="guid" type="GUIDType" use="required"/>
		<xsd:attribute name="name" type="xsd:string" use="required"/>
	</xsd:complexType>
	<xsd:complexType name="CodeBookMemberType">
		<xsd:attribute name="guid" type="GUIDType" use="required"/>
	</xsd:complexType>`;
  const s = projectSchema().replace(/urn:QDA-XML:project:1\.0/g, 'urn:QDA-XML:codebook:1.0');
  const start = s.indexOf('<xsd:element name="Project"');
  const end = s.indexOf('</xsd:element>', start) + '</xsd:element>'.length;
  if (start < 0 || end < start) throw new Error('Project.xsd does not have the expected Project element');
  return s.slice(0, start) + extra.trim() + s.slice(end);
}

export async function validateAgainst(xml: string, kind: 'project' | 'codebook'): Promise<{ valid: boolean; errors: string[] }> {
  const r = await validateXML({
    xml: [{ fileName: kind === 'project' ? 'project.qde' : 'codebook.qdc', contents: xml }],
    schema: [{ fileName: kind === 'project' ? 'Project.xsd' : 'Codebook.xsd', contents: kind === 'project' ? projectSchema() : codebookSchema() }],
    initialMemoryPages: 512,
    maxMemoryPages: 16384,
  });
  return { valid: r.valid, errors: r.errors.map((e) => e.rawMessage) };
}
