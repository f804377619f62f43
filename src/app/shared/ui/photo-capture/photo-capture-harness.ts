import { ComponentHarness } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';

/** Drives a photo field in tests the way a person would: pick a file, read what each photo says. */
export class PhotoCaptureHarness extends ComponentHarness {
  static hostSelector = 'sw-photo-capture';

  private readonly photoItems = this.locatorForAll('li.photo');

  /** Hand files to the camera (default) or to "Choose from device", as the browser does after the person picks. */
  async pick(files: File[], from: 'camera' | 'device' = 'camera'): Promise<void> {
    const input = await this.locatorFor(`input[type=file][data-source=${from}]`)();
    const element = TestbedHarnessEnvironment.getNativeElement(input) as HTMLInputElement;
    const transfer = new DataTransfer();
    files.forEach((f) => transfer.items.add(f));
    element.files = transfer.files;
    await input.dispatchEvent('change');
  }

  async label(): Promise<string> {
    return (await this.locatorFor('legend')()).text();
  }

  async count(): Promise<string> {
    return (await this.locatorFor('.count')()).text();
  }

  /** Each photo's state: uploading, done, offline, failed, refused or removing. */
  async states(): Promise<string[]> {
    return Promise.all((await this.photoItems()).map(async (li) => (await li.getAttribute('data-state')) ?? ''));
  }

  /** The text each photo shows under its picture (progress, saved, or the problem). */
  async messages(): Promise<string[]> {
    const items = await this.photoItems();
    return Promise.all(items.map(async (li) => (await li.text({ exclude: '.actions' })).trim()));
  }

  /** The picture each photo shows (an object URL), or null while there is none. */
  async previews(): Promise<(string | null)[]> {
    const items = await this.photoItems();
    return Promise.all(
      items.map(async (li) => {
        const img = TestbedHarnessEnvironment.getNativeElement(li).querySelector('img');
        return img ? img.getAttribute('src') : null;
      }),
    );
  }
}
